// Inbound FlatBuffers codec: verify a buffer, decode it into the engine's plain structs, and
// encode plain structs (for `send`, the journal and tests). No FlatBuffers type leaks out.
#pragma once

#include <cstddef>
#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "liveprob/engine/messages.hpp"

namespace liveprob::protocol {

// Schema version this build speaks (see protocol/schemas/common.fbs).
inline constexpr std::uint16_t kSchemaMajor = 1;
inline constexpr std::uint16_t kSchemaMinor = 0;

// Largest inbound buffer accepted; anything bigger is rejected before verification.
inline constexpr std::size_t kMaxFeedMessageBytes = 64 * 1024;

// Why a buffer was rejected. Stable names (decode_error_name) feed the service's counters.
enum class DecodeError : std::uint8_t {
    none = 0,
    too_small,             // shorter than a FlatBuffers header
    oversize,              // longer than the size limit
    wrong_identifier,      // not this message type's file identifier
    malformed,             // the FlatBuffers Verifier refused it
    wrong_schema_version,  // major version differs from ours
    missing_field,         // a required part is absent
    bad_value,             // a field is out of its range (unknown enum, NaN, negative, ...)
};
const char* decode_error_name(DecodeError e) noexcept;

struct FeedDecodeResult {
    std::optional<InboundMessage> message;  // set exactly when error == none
    DecodeError error = DecodeError::none;
    std::string detail;                      // one line, for logs
};

FeedDecodeResult decode_feed_message(std::span<const std::uint8_t> bytes);
std::vector<std::uint8_t> encode_feed_message(const InboundMessage& message);

}  // namespace liveprob::protocol
