// Private to the gateway: one message read off the feed, verified and decoded into what the
// gateway keeps. Other message types on the feed (the service's counters) are told apart from
// damaged updates so that only the latter count as rejected.
#pragma once

#include <cstdint>
#include <optional>
#include <span>
#include <string>

#include "liveprob/adapters/gateway/update_json.hpp"

namespace liveprob::gateway {

struct Intake {
    enum class Kind : std::uint8_t { update, other_message, rejected } kind = Kind::rejected;
    GatewayUpdate update;  // when kind == update
    std::string detail;    // when rejected: one line, for the log
};

Intake take_in(std::span<const std::uint8_t> payload, std::int64_t received_us);

}  // namespace liveprob::gateway
