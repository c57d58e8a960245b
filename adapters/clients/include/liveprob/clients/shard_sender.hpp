// Pushes encoded feed messages to engine shards without asking for acknowledgements (see
// acked_sender.hpp for that): one DEALER socket per shard's ingest endpoint (given in shard
// order, 0/N first), each message one frame, to the shard that owns its match id
// (protocol/sharding.hpp), so `serve --shard K/N` only ever receives its own matches. A shard
// that is down holds up only its own queue: every socket is separate, and a connecting DEALER
// keeps what it could not deliver (up to the high-water mark) until the shard is back.
#pragma once

#include <cstdint>
#include <span>
#include <string>
#include <vector>

#include <zmq.hpp>

#include "liveprob/clients/curve_client.hpp"

namespace liveprob::clients {

struct ShardSenderOptions {
    int linger_ms = 5000;  // how long closing waits for unsent messages
    int send_high_water_mark = 1'000'000;
    CurveClientKeys keys;  // the same feed key for every shard
};

class ShardSender {
public:
    // Throws std::invalid_argument for an empty list or more than 1,024 endpoints.
    ShardSender(zmq::context_t& context, const std::vector<std::string>& ingest_endpoints,
                const ShardSenderOptions& options = {});

    // Sends one encoded feed message of `match_id` to its shard; waits while that shard's
    // queue is full.
    void send(std::uint64_t match_id, std::span<const std::uint8_t> bytes);

    std::uint32_t shard_count() const noexcept {
        return static_cast<std::uint32_t>(sockets_.size());
    }
    const std::vector<std::string>& endpoints() const noexcept { return endpoints_; }
    // Messages sent to each shard so far, in shard order.
    const std::vector<std::uint64_t>& sent_per_shard() const noexcept { return sent_; }

private:
    std::vector<std::string> endpoints_;
    std::vector<zmq::socket_t> sockets_;
    std::vector<std::uint64_t> sent_;
};

}  // namespace liveprob::clients
