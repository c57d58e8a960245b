// Builds inbound messages for tests the way a feed numbers them: one match id, source
// sequence numbers counting up, clocks given in minutes of the running match clock.
#pragma once

#include <cmath>
#include <cstdint>
#include <utility>

#include "liveprob/engine/messages.hpp"

namespace liveprob::test {

inline MatchClock at_minute(Period period, double minute) {
    return MatchClock{period, static_cast<std::uint32_t>(std::llround(minute * 60'000.0))};
}

class FeedBuilder {
public:
    explicit FeedBuilder(std::uint64_t match_id, std::uint64_t first_seq = 1)
        : match_id_(match_id), next_seq_(first_seq) {}

    // The next message in feed order.
    InboundMessage next(MessageBody body, MatchClock clock) {
        return with_seq(next_seq_++, std::move(body), clock);
    }
    InboundMessage with_seq(std::uint64_t seq, MessageBody body, MatchClock clock) const {
        InboundMessage m;
        m.header.match_id = match_id_;
        m.header.source_seq = seq;
        m.header.source_time_us = 1'800'000'000'000'000 + static_cast<std::int64_t>(seq) * 1'000'000;
        m.header.clock = clock;
        m.body = std::move(body);
        return m;
    }

    InboundMessage start(Period p, double minute) { return next(PeriodStart{p}, at_minute(p, minute)); }
    InboundMessage end(Period p, double minute) { return next(PeriodEnd{p}, at_minute(p, minute)); }
    InboundMessage goal(Side s, Period p, double minute) { return next(Goal{s, false, false}, at_minute(p, minute)); }
    InboundMessage red(Side s, Period p, double minute) { return next(RedCard{s, false}, at_minute(p, minute)); }
    InboundMessage shot(Side s, double xg, Period p, double minute) { return next(ShotXg{s, xg}, at_minute(p, minute)); }
    InboundMessage kick(Side s, bool scored) { return next(ShootoutKick{s, scored}, MatchClock{Period::shootout, 0}); }
    InboundMessage whistle(Period p, double minute) { return next(FinalWhistle{}, at_minute(p, minute)); }

    std::uint64_t last_seq() const noexcept { return next_seq_ - 1; }
    std::uint64_t match_id() const noexcept { return match_id_; }

private:
    std::uint64_t match_id_;
    std::uint64_t next_seq_;
};

}  // namespace liveprob::test
