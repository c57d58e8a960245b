// One soak phase: start the backends (serve shards, or bare forwarders as the baseline) and,
// with more than one shard, a relay in front; push the feed at a fixed rate through the
// routing sender; read every update through one subscriber; sample the processes' memory and
// CPU as it goes.
#pragma once

#include <cstdint>
#include <filesystem>
#include <string>
#include <vector>

#include "soak_feed.hpp"

namespace liveprob::soak {

enum class Backend { serve, bare_forwarder };

struct PhaseSettings {
    Backend backend = Backend::serve;
    double seconds = 60.0;
    double rate = 1000.0;  // feed messages per second
    std::uint32_t shards = 1;
    std::uint32_t tick_ms = 1000;
    bool journal = true;
    double sample_seconds = 10.0;
    double drain_seconds = 30.0;
    std::filesystem::path liveprob;  // the program
    std::filesystem::path self;      // this harness (runs the bare forwarder)
    std::filesystem::path scratch;   // logs, endpoints files, journals
};

// Memory and CPU of one process over one sample interval.
struct ProcessSample {
    std::string name;
    std::uint64_t rss_kib = 0;
    double cpu_share = 0.0;  // CPU seconds per wall second over the interval (1.0 = one core)
};

struct Sample {
    double at_seconds = 0.0;  // since the feed started
    std::vector<ProcessSample> processes;
};

struct Arrival {
    double at_seconds;  // since the feed started
    double latency_us;  // from the sender's send to the subscriber's receive
};

struct PhaseResult {
    PhaseSettings settings;
    std::uint64_t sent = 0;
    double send_seconds = 0.0;  // how long sending took (longer than asked: the sender fell behind)
    std::vector<Arrival> arrivals;   // event updates, in arrival order
    std::vector<double> tick_times;  // clock-tick updates (seconds since the feed started)
    std::uint64_t duplicates = 0;    // an event's update seen twice
    std::uint64_t foreign = 0;       // updates for no event of this feed
    std::vector<Sample> samples;
    // Engine verdicts at the end, summed over the shards (serve only).
    std::uint64_t accepted = 0, rejected = 0, late = 0, duplicate_inputs = 0;
};

PhaseResult run_phase(const PhaseSettings& settings, const SoakFeed& feed);

// The bare forwarder of the baseline: PULL -> PUB under the topic "match.", no other work.
// Binds ephemeral loopback ports and writes them to `endpoints_file`; runs until SIGTERM.
int run_bare_forwarder(const std::string& endpoints_file);

}  // namespace liveprob::soak
