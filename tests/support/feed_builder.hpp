// Builds inbound messages for tests the way a feed numbers them: one match id, source
// sequence numbers counting up, clocks given in minutes of the running match clock.
#pragma once

#include <cmath>
#include <cstdint>
#include <utility>
#include <vector>

#include "liveprob/core/messages.hpp"

namespace liveprob::test {

inline core::MatchClock at_minute(core::Period period, double minute) {
    return core::MatchClock{period, static_cast<std::uint32_t>(std::llround(minute * 60'000.0))};
}

class FeedBuilder {
public:
    explicit FeedBuilder(std::uint64_t match_id, std::uint64_t first_seq = 1)
        : match_id_(match_id), next_seq_(first_seq) {}

    // The next message in feed order.
    core::InboundMessage next(core::MessageBody body, core::MatchClock clock) {
        return with_seq(next_seq_++, std::move(body), clock);
    }
    core::InboundMessage with_seq(std::uint64_t seq, core::MessageBody body,
                                  core::MatchClock clock) const {
        core::InboundMessage m;
        m.header.match_id = match_id_;
        m.header.source_seq = seq;
        m.header.source_time_us =
            1'800'000'000'000'000 + static_cast<std::int64_t>(seq) * 1'000'000;
        m.header.clock = clock;
        m.body = std::move(body);
        return m;
    }

    core::InboundMessage start(core::Period p, double minute) {
        return next(core::PeriodStart{p}, at_minute(p, minute));
    }
    core::InboundMessage end(core::Period p, double minute) {
        return next(core::PeriodEnd{p}, at_minute(p, minute));
    }
    core::InboundMessage goal(core::Side s, core::Period p, double minute) {
        return next(core::Goal{s, false, false}, at_minute(p, minute));
    }
    core::InboundMessage red(core::Side s, core::Period p, double minute) {
        return next(core::RedCard{s, false}, at_minute(p, minute));
    }
    core::InboundMessage shot(core::Side s, double xg, core::Period p, double minute) {
        return next(core::ShotXg{s, xg}, at_minute(p, minute));
    }
    core::InboundMessage kick(core::Side s, bool scored) {
        return next(core::ShootoutKick{s, scored}, core::MatchClock{core::Period::shootout, 0});
    }
    core::InboundMessage whistle(core::Period p, double minute) {
        return next(core::FinalWhistle{}, at_minute(p, minute));
    }

    // A knock-out level 1-1 after 90 minutes (away at 30', home at 80'; one and three minutes
    // of stoppage), up to the start of extra time.
    std::vector<core::InboundMessage> level_into_extra_time() {
        using core::Period;
        using core::Side;
        return {start(Period::first_half, 0.0),
                goal(Side::away, Period::first_half, 30.0),
                end(Period::first_half, 46.0),
                start(Period::second_half, 45.0),
                goal(Side::home, Period::second_half, 80.0),
                end(Period::second_half, 93.0),
                start(Period::extra_first, 90.0)};
    }

    std::uint64_t last_seq() const noexcept { return next_seq_ - 1; }
    std::uint64_t match_id() const noexcept { return match_id_; }

private:
    std::uint64_t match_id_;
    std::uint64_t next_seq_;
};

}  // namespace liveprob::test
