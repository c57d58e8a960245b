// Semantic checks of an inbound message: the rules a structurally valid message must still
// meet before the engine folds it (enum values in range, finite numbers, plausible limits,
// required parts present). Both wire forms (FlatBuffers and JSON lines) apply the same checks,
// and name fields by their JSON-lines names (protocol/README.md) so one vocabulary serves both.
#pragma once

#include <cstdint>
#include <optional>
#include <string>

#include "liveprob/core/messages.hpp"
#include "liveprob/protocol/decode_error.hpp"

namespace liveprob::protocol {

// Limits beyond which a value is taken as a feed fault rather than football. They are bounds
// of plausibility, not of the rules of the game (common practice: reject, do not clamp). A
// setup's prior and format are checked by the engine's own validate_setup
// (core/validate.hpp), so the wire never passes a setup the engine would refuse.
inline constexpr std::uint32_t kMaxClockMs = 180u * 60u * 1000u;  // 180 minutes of match clock
inline constexpr std::uint16_t kMaxStoppageMinutes = 30;
inline constexpr std::size_t kMaxNameBytes = 200;  // team names, rating keys
inline constexpr std::size_t kMaxReasonBytes = 500;

struct MessageProblem {
    DecodeError error = DecodeError::bad_value;  // bad_value or missing_field
    std::string field;                           // JSON-lines name, e.g. "prior.home"
    std::string reason;                          // e.g. "must be finite, got nan"

    // "field 'prior.home': must be finite, got nan"
    std::string describe() const;
};

// The first problem found, or nothing when the message may be folded.
std::optional<MessageProblem> check_message(const core::InboundMessage& message);

// Raw enum values as read from a wire buffer (they may be anything).
bool is_known_period(std::uint8_t raw) noexcept;
bool is_known_side(std::uint8_t raw) noexcept;

}  // namespace liveprob::protocol
