// Inbound messages for the benchmarks: a header with a fixed feed time (the benchmarks time
// the engine and the service, not the feed's clock) and a body.
#pragma once

#include <cstdint>
#include <utility>

#include "liveprob/core/messages.hpp"

namespace liveprob::bench {

inline core::InboundMessage message(std::uint64_t match_id, std::uint64_t seq, core::Period period,
                                    std::uint32_t clock_ms, core::MessageBody body) {
    core::InboundMessage m;
    m.header = {match_id, seq, 1'800'000'000'000'000, {period, clock_ms}};
    m.body = std::move(body);
    return m;
}

}  // namespace liveprob::bench
