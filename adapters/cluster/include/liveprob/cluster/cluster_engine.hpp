// `serve` in cluster mode: the engine process of a NATS JetStream cluster. It holds leases on a
// share of the feed stream's partitions (partition_leases.hpp), reads each held partition from
// the start of the stream (an ordered consumer), folds every message through the same
// MatchRegistry as the single-machine service, and publishes every update on the match's
// subject (core NATS) and the latest one in the latest-state bucket (history 1). A partition it
// takes is rebuilt silently until the stream's end, then each of its matches is published once,
// with an output sequence that goes on from the wall clock in microseconds (as a restarted
// serve does), so sequences never go back across a takeover. One thread folds and publishes; the
// client's threads only hand messages over.
#pragma once

#include <atomic>
#include <chrono>
#include <memory>
#include <string>
#include <vector>

#include "liveprob/cluster/cluster_layout.hpp"
#include "liveprob/core/params.hpp"
#include "liveprob/service/match_registry.hpp"

namespace liveprob::cluster {

struct ClusterEngineOptions {
    std::vector<std::string> servers;  // nats:// URLs
    ClusterLayout layout;
    std::string engine_name;  // unique among the engines
    std::chrono::milliseconds lease_time{5000};
    std::chrono::milliseconds tick_interval{1000};
    std::chrono::milliseconds counters_interval{5000};
    service::RegistryLimits limits;
};

class ClusterEngine {
public:
    ClusterEngine(ClusterEngineOptions options, core::ModelParams params);
    ~ClusterEngine();
    ClusterEngine(const ClusterEngine&) = delete;
    ClusterEngine& operator=(const ClusterEngine&) = delete;

    // Runs until stop() (from a signal handler too): then gives its leases back and returns.
    void run();
    void stop() noexcept;

private:
    struct Impl;
    std::unique_ptr<Impl> impl_;
};

// A default engine name: host name and process id.
std::string default_engine_name();

}  // namespace liveprob::cluster
