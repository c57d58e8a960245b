// `liveprob relay`: the one endpoint subscribers connect to when matches are spread over
// several `serve --shard K/N` processes.
//  * Updates: an XSUB connected to every shard's publish socket, forwarded to an XPUB by
//    ZeroMQ's own proxy; subscriptions travel upstream, so shards still filter by topic.
//  * Snapshots: a ROUTER that answers like serve's snapshot socket. A request for one match is
//    forwarded to the shard that owns it (protocol/sharding.hpp); a request for every match
//    (id 0) goes to every shard and the replies are merged. A shard that does not answer
//    within the timeout is named in the reply's error; the others' matches are still sent.
// The two run on separate threads, so a slow or dead shard never pauses the updates.
#pragma once

#include <chrono>
#include <string>
#include <vector>

namespace liveprob::service {

struct RelayConfig {
    std::vector<std::string> shard_publish;   // index = shard K
    std::vector<std::string> shard_snapshot;  // same order; may be empty (no snapshot routing)
    std::string publish_endpoint = "tcp://127.0.0.1:7441";
    std::string snapshot_endpoint = "tcp://127.0.0.1:7442";
    std::string endpoints_file;  // bound endpoints written here ("publish=..." lines)
    int high_water_mark = 20000;
    std::chrono::milliseconds shard_timeout{1000};
};

// Runs until SIGINT or SIGTERM. Throws std::runtime_error naming what could not be bound.
void run_relay(const RelayConfig& config);

}  // namespace liveprob::service
