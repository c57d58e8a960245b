#include "soak_process.hpp"

#include "liveprob/files/endpoints_file.hpp"

#include <stdexcept>
#include <thread>

namespace liveprob::soak {

SoakProcess::SoakProcess(std::string name, const std::vector<std::string>& argv,
                         const std::filesystem::path& log)
    : name_(std::move(name)), process_(argv, log) {}

std::map<std::string, std::string> wait_for_endpoints_file(const std::filesystem::path& path,
                                                           SoakProcess& writer,
                                                           std::chrono::seconds limit) {
    const auto deadline = std::chrono::steady_clock::now() + limit;
    while (!std::filesystem::exists(path)) {
        if (!writer.running())
            throw std::runtime_error(writer.name() + " ended before it was listening");
        if (std::chrono::steady_clock::now() > deadline)
            throw std::runtime_error(writer.name() + " did not start");
        std::this_thread::sleep_for(std::chrono::milliseconds(20));
    }
    return files::read_endpoints_file(path.string());
}

}  // namespace liveprob::soak
