// The processes a soak runs (serve shards, the relay, bare forwarders): started with their
// output in a log file, sampled for memory and CPU from /proc, stopped with SIGTERM.
#pragma once

#include <sys/types.h>

#include <chrono>
#include <cstdint>
#include <filesystem>
#include <map>
#include <string>
#include <vector>

#include "harness/child_process.hpp"

namespace liveprob::soak {

class SoakProcess {
public:
    SoakProcess(std::string name, const std::vector<std::string>& argv,
                const std::filesystem::path& log);
    SoakProcess(const SoakProcess&) = delete;
    SoakProcess& operator=(const SoakProcess&) = delete;

    const std::string& name() const noexcept { return name_; }
    pid_t pid() const noexcept { return process_.pid(); }
    bool running() { return process_.running(); }
    // SIGTERM, then SIGKILL after `grace`.
    void stop(std::chrono::milliseconds grace = std::chrono::milliseconds(5000)) {
        process_.stop(grace);
    }

    // Resident memory now (KiB) and CPU time used so far (user + system, seconds); 0 once ended.
    std::uint64_t rss_kib() const { return harness::memory_kib(process_.pid()); }
    double cpu_seconds() const { return harness::cpu_seconds(process_.pid()); }

private:
    std::string name_;
    harness::ChildProcess process_;
};

// The endpoints file serve or relay writes (files/endpoints_file.hpp), once it is there.
std::map<std::string, std::string> wait_for_endpoints_file(const std::filesystem::path& path,
                                                           SoakProcess& writer,
                                                           std::chrono::seconds limit);

}  // namespace liveprob::soak
