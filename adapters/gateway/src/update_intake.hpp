// Private to the gateway: one message read off a match topic of the feed, verified and decoded
// into what the gateway keeps.
#pragma once

#include <cstdint>
#include <optional>
#include <span>
#include <string>

#include "liveprob/gateway/update_json.hpp"

namespace liveprob::gateway {

struct Intake {
    enum class Kind : std::uint8_t { update, rejected } kind = Kind::rejected;
    GatewayUpdate update;  // when kind == update
    std::string detail;    // when rejected: one line, for the log
};

Intake take_in(std::span<const std::uint8_t> payload, std::int64_t received_us);

}  // namespace liveprob::gateway
