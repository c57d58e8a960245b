// The service's outbound messages on the wire: probability updates (update.fbs), snapshot
// request/reply (snapshot_request.fbs, snapshot_reply.fbs) and counters (counters.fbs).
// Encoders reuse one builder, so steady-state publishing allocates nothing; decoders verify
// every buffer (identifier, FlatBuffers Verifier, schema major version) before reading it.
//
// This is the runtime's own codec for the outbound schemas, kept to exactly what `serve`,
// `tap` and the tests need; the schemas in protocol/schemas stay the single source of truth.
#pragma once

#include <cstdint>
#include <memory>
#include <optional>
#include <span>
#include <string>
#include <utility>
#include <vector>

#include "liveprob/engine/outputs.hpp"

namespace liveprob::adapters {

// One published update: the engine's outputs plus where they come from and when.
struct PublishedUpdate {
    std::uint64_t match_id = 0;
    std::uint64_t output_seq = 0;
    std::uint64_t input_seq = 0;
    std::int64_t receive_time_us = 0;  // 0 for a timer tick
    std::int64_t publish_time_us = 0;
    std::uint32_t compute_ns = 0;
    Outputs outputs;
};

struct NamedCounter {
    std::string name;
    std::uint64_t value = 0;
};

class WireEncoder {
public:
    WireEncoder();
    ~WireEncoder();
    WireEncoder(const WireEncoder&) = delete;
    WireEncoder& operator=(const WireEncoder&) = delete;

    // Each returns a view of the encoder's buffer, valid until the next call.
    std::span<const std::uint8_t> update(const PublishedUpdate& update);
    std::span<const std::uint8_t> snapshot_request(std::uint64_t match_id);
    std::span<const std::uint8_t> snapshot_reply(const std::vector<PublishedUpdate>& updates,
                                                 const std::string& error);
    std::span<const std::uint8_t> counters(std::int64_t publish_time_us,
                                           const std::vector<NamedCounter>& values);

private:
    struct Builder;
    std::unique_ptr<Builder> builder_;
};

// nullopt with `why` set when the buffer is not a valid message of that kind.
std::optional<PublishedUpdate> decode_update(std::span<const std::uint8_t> bytes, std::string& why);
std::optional<std::uint64_t> decode_snapshot_request(std::span<const std::uint8_t> bytes, std::string& why);
struct SnapshotReplyContent {
    std::string error;
    std::vector<PublishedUpdate> updates;
};
std::optional<SnapshotReplyContent> decode_snapshot_reply(std::span<const std::uint8_t> bytes, std::string& why);
std::optional<std::vector<NamedCounter>> decode_counters(std::span<const std::uint8_t> bytes, std::string& why);

}  // namespace liveprob::adapters
