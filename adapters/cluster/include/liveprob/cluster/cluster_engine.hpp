// `serve` in cluster mode: the engine process of a NATS JetStream cluster. It holds leases on a
// share of the feed stream's partitions (partition_leases.hpp), reads each held partition from
// the start of the stream (an ordered consumer) and runs one service core per partition
// (service/service_core.hpp: the very rules serve runs, so the same feed gives the same update
// bytes). The stream stands in for serve's journal: a taken partition's history is restored
// through the core without publishing until the stream's end, then each of its matches is
// published once with an output sequence that goes on from the wall clock in microseconds (as a
// restarted serve does), so sequences never go back across a takeover. Every update goes on the
// match's subject (core NATS) and into the latest-state bucket (history 1), unless the engine's
// lease on the partition is in doubt (fencing). One thread folds and publishes; the client's
// threads only hand messages over.
#pragma once

#include <atomic>
#include <chrono>
#include <memory>
#include <string>
#include <vector>

#include "liveprob/cluster/cluster_layout.hpp"
#include "liveprob/core/params.hpp"
#include "liveprob/service/service_core.hpp"

namespace liveprob::cluster {

struct ClusterEngineOptions {
    std::vector<std::string> servers;  // nats:// URLs
    ClusterLayout layout;
    std::string engine_name;  // unique among the engines
    std::chrono::milliseconds lease_time{5000};
    std::chrono::milliseconds tick_interval{1000};
    std::chrono::milliseconds counters_interval{5000};
    // The core's limits and silence thresholds (service::core_settings()); `owns` is set per
    // partition by the engine.
    service::CoreSettings core;
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
