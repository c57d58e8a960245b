#include "test_env.hpp"

#include <sys/wait.h>
#include <unistd.h>
#include <array>
#include <cstdio>
#include <cstdlib>
#include <stdexcept>

namespace liveprob::test {

std::filesystem::path open_data_dir() {
    const char* env = std::getenv("LIVEPROB_OPEN_DATA");
    std::filesystem::path dir = env && *env ? std::filesystem::path(env)
                                            : std::filesystem::path(LIVEPROB_OPEN_DATA_DEFAULT);
    if (!std::filesystem::is_directory(dir / "international")) {
        throw std::runtime_error("open datasets not found at " + dir.string() +
                                 " (set LIVEPROB_OPEN_DATA)");
    }
    return dir;
}

std::filesystem::path source_dir() { return LIVEPROB_SOURCE_DIR; }
std::filesystem::path liveprob_binary() { return LIVEPROB_BINARY_PATH; }

std::string system_python() { return "/usr/bin/python3"; }

CommandResult python_sha256(const std::string& paths) {
    return run_command(system_python() +
                       " -c 'import hashlib,sys\nfor p in sys.argv[1:]: "
                       "print(hashlib.sha256(open(p,\"rb\").read()).hexdigest())' " +
                       paths);
}

CommandResult run_command(const std::string& command) {
    CommandResult result;
    FILE* pipe = ::popen(command.c_str(), "r");
    if (!pipe) throw std::runtime_error("cannot run: " + command);
    std::array<char, 4096> buffer{};
    size_t n = 0;
    while ((n = std::fread(buffer.data(), 1, buffer.size(), pipe)) > 0)
        result.out.append(buffer.data(), n);
    const int status = ::pclose(pipe);
    result.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    return result;
}

std::filesystem::path scratch_dir(const std::string& name) {
    // mkdtemp makes a directory nobody else holds. A name from the process id alone is not
    // enough: ids are reused within minutes here (pid_max 32768, several builds at once), and a
    // test in another work tree that drew the same id used to clear this one's folder mid-run.
    std::string path =
        (std::filesystem::temp_directory_path() / ("liveprob-test-" + name + "-XXXXXX")).string();
    if (::mkdtemp(path.data()) == nullptr)
        throw std::runtime_error("cannot create a scratch folder " + path);
    return path;
}

}  // namespace liveprob::test
