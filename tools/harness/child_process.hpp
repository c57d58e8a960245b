// A program started by a test or an end-to-end harness (serve, gateway, relay, send, a browser):
// its output goes to files, it can be signalled, waited for and sampled (memory, CPU), and it is
// stopped when the object goes, however the test or run ends, so nothing is left running.
// One class for the integration tests, the benchmarks that run real processes and the soak.
#pragma once

#include <fcntl.h>
#include <signal.h>
#include <spawn.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cstdint>
#include <filesystem>
#include <fstream>
#include <optional>
#include <sstream>
#include <stdexcept>
#include <string>
#include <string_view>
#include <thread>
#include <vector>

extern char** environ;

namespace liveprob::harness {

class ChildProcess {
public:
    // argv[0] is the program's path. Standard output goes to `out`; standard error to `err`, or
    // to `out` as well when `err` is empty.
    ChildProcess(const std::vector<std::string>& argv, const std::filesystem::path& out,
                 const std::filesystem::path& err = {})
        : out_(out) {
        posix_spawn_file_actions_t actions;
        posix_spawn_file_actions_init(&actions);
        posix_spawn_file_actions_addopen(&actions, 1, out.c_str(), O_WRONLY | O_CREAT | O_TRUNC,
                                         0644);
        if (err.empty()) {
            posix_spawn_file_actions_adddup2(&actions, 1, 2);
        } else {
            posix_spawn_file_actions_addopen(&actions, 2, err.c_str(), O_WRONLY | O_CREAT | O_TRUNC,
                                             0644);
        }
        std::vector<char*> args;
        for (const auto& a : argv) args.push_back(const_cast<char*>(a.c_str()));
        args.push_back(nullptr);
        const int rc = ::posix_spawn(&pid_, args[0], &actions, nullptr, args.data(), environ);
        posix_spawn_file_actions_destroy(&actions);
        if (rc != 0) throw std::runtime_error("cannot start " + argv.at(0));
    }
    ~ChildProcess() { stop(); }
    ChildProcess(const ChildProcess&) = delete;
    ChildProcess& operator=(const ChildProcess&) = delete;

    // The process id while it runs, -1 once it has ended and been reaped.
    pid_t pid() const noexcept { return pid_; }
    void signal(int sig) {
        if (pid_ > 0) ::kill(pid_, sig);
    }

    // True while the program runs; records its exit status once it has ended.
    bool running() { return !wait(std::chrono::milliseconds(0)).has_value(); }

    // Its exit code, or minus the signal that ended it; nullopt if it still runs after `limit`.
    std::optional<int> wait(std::chrono::milliseconds limit) {
        const auto deadline = std::chrono::steady_clock::now() + limit;
        while (pid_ > 0) {
            int status = 0;
            if (::waitpid(pid_, &status, WNOHANG) == pid_) {
                pid_ = -1;
                exit_status_ = WIFEXITED(status) ? WEXITSTATUS(status) : -WTERMSIG(status);
                break;
            }
            if (std::chrono::steady_clock::now() >= deadline) return std::nullopt;
            std::this_thread::sleep_for(std::chrono::milliseconds(10));
        }
        return exit_status_;
    }

    // SIGTERM (a clean shutdown: serve flushes its journal), then SIGKILL if it has not ended
    // within `grace`; returns how it ended.
    std::optional<int> stop(std::chrono::milliseconds grace = std::chrono::milliseconds(3000)) {
        if (pid_ <= 0) return exit_status_;
        signal(SIGTERM);
        if (auto status = wait(grace)) return status;
        signal(SIGKILL);
        return wait(std::chrono::hours(1));
    }

    // What it wrote to standard output so far.
    std::string output() const {
        std::ifstream in(out_, std::ios::binary);
        std::ostringstream text;
        text << in.rdbuf();
        return text.str();
    }

private:
    pid_t pid_ = -1;
    std::optional<int> exit_status_;
    std::filesystem::path out_;
};

// A line of /proc/<pid>/status in KiB ("VmRSS:" resident now, "VmHWM:" its peak); 0 when the
// process is gone.
inline std::uint64_t memory_kib(pid_t pid, std::string_view key = "VmRSS:") {
    std::ifstream status("/proc/" + std::to_string(pid) + "/status");
    for (std::string line; std::getline(status, line);) {
        if (line.rfind(key, 0) == 0) return std::stoull(line.substr(key.size()));
    }
    return 0;
}

// CPU time the process has used (user + system), in seconds; 0 when it is gone.
inline double cpu_seconds(pid_t pid) {
    std::ifstream stat("/proc/" + std::to_string(pid) + "/stat");
    std::string text;
    std::getline(stat, text);
    const auto close = text.rfind(')');  // the command name may hold spaces
    if (close == std::string::npos) return 0.0;
    std::istringstream fields(text.substr(close + 2));
    std::string field;
    double ticks = 0.0;
    // After the name: the state is field 3; utime and stime are fields 14 and 15.
    for (int i = 3; i <= 15 && fields >> field; ++i) {
        if (i == 14 || i == 15) ticks += std::stod(field);
    }
    return ticks / static_cast<double>(::sysconf(_SC_CLK_TCK));
}

}  // namespace liveprob::harness
