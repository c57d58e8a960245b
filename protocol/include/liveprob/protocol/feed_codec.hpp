// Inbound FlatBuffers codec: verify a buffer, decode it into the engine's plain structs, and
// encode plain structs (for `send`, the journal and tests). No FlatBuffers type leaks out.
#pragma once

#include <cstddef>
#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "liveprob/core/messages.hpp"
#include "liveprob/protocol/decode_error.hpp"

namespace liveprob::protocol {

// Schema version this build speaks (see protocol/schemas/common.fbs).
inline constexpr std::uint16_t kSchemaMajor = 1;
inline constexpr std::uint16_t kSchemaMinor = 2;

// Largest inbound buffer accepted; anything bigger is rejected before verification.
inline constexpr std::size_t kMaxFeedMessageBytes = 64 * 1024;

struct FeedDecodeResult {
    std::optional<core::InboundMessage> message;  // set exactly when error == none
    DecodeError error = DecodeError::none;
    std::string detail;  // one line, for logs
};

// Verifies `bytes` (size limit, identifier, FlatBuffers Verifier, schema major version, then the
// semantic checks of message_checks.hpp) and decodes it. Never reads outside `bytes`.
FeedDecodeResult decode_feed_message(std::span<const std::uint8_t> bytes);

// Encodes `message` as it is (no checks, so tests can build bad messages on purpose).
std::vector<std::uint8_t> encode_feed_message(const core::InboundMessage& message);

}  // namespace liveprob::protocol
