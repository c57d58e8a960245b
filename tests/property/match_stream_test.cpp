// Properties of the engine over thousands of random match streams (seeded): every output
// distribution sums to 1; a goal never lowers the scorer's chance of winning; at 0-0 the
// draw grows as the clock runs; any permutation and duplication of a stream gives the
// identical final state and outputs.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <optional>
#include <random>

#include "liveprob/core/match.hpp"
#include "liveprob/core/position.hpp"
#include "outputs_bitwise.hpp"
#include "random_match_stream.hpp"

using namespace liveprob;

using namespace liveprob::core;
using liveprob::test::bitwise_same;
using liveprob::test::kStreamScale;
using liveprob::test::RandomStream;
using liveprob::test::StreamGenerator;

namespace {

constexpr std::uint64_t kMatch = 5150;
constexpr double kSumTolerance = 1e-12;

// Every distribution among the outputs sums to 1 and every probability lies in [0, 1].
void check_distributions(const Outputs& o) {
    CHECK(std::abs(o.p_home + o.p_draw + o.p_away - 1.0) <= kSumTolerance);
    CHECK(std::abs(o.next_goal_home + o.next_goal_away + o.next_goal_none - 1.0) <= kSumTolerance);
    double grid = o.tail_mass;
    double smallest = o.tail_mass;
    for (const auto& row : o.goals_added) {
        for (double v : row) {
            smallest = std::min(smallest, v);
            grid += v;
        }
    }
    CHECK(smallest >= 0.0);
    CHECK(std::abs(grid - 1.0) <= kSumTolerance);
    if (o.has_advance) CHECK(std::abs(o.p_advance_home + o.p_advance_away - 1.0) <= kSumTolerance);
    // Never below zero, not even by a rounding error (screens print what they get).
    for (double p : {o.p_home, o.p_draw, o.p_away, o.next_goal_home, o.next_goal_away,
                     o.next_goal_none, o.p_both_score, o.p_advance_home, o.p_advance_away}) {
        CHECK(p >= 0.0);
        CHECK(p <= 1.0 + kSumTolerance);
    }
    for (double p : o.p_over) CHECK(p >= 0.0);
    for (std::size_t i = 1; i < o.p_over.size(); ++i)
        CHECK(o.p_over[i] <= o.p_over[i - 1] + kSumTolerance);
}

Match replay(const RandomStream& s, std::size_t count) {
    Match m(kMatch, s.setup, s.params);
    for (std::size_t i = 0; i < count && i < s.messages.size(); ++i) (void)m.apply(s.messages[i]);
    return m;
}

}  // namespace

TEST_CASE("every output distribution sums to 1 after every message and clock step", "[property]") {
    StreamGenerator gen(20261201, kMatch);
    const int streams = 1000 / kStreamScale;
    std::size_t checked = 0;
    for (int n = 0; n < streams; ++n) {
        const RandomStream s = gen.next();
        Match m(kMatch, s.setup, s.params);
        check_distributions(m.outputs());
        for (const auto& msg : s.messages) {
            (void)m.apply(msg);
            check_distributions(m.outputs());
            ++checked;
            if (m.state().status == MatchStatus::in_play && checked % 3 == 0) {
                MatchClock later = m.state().clock;
                later.clock_ms += 90'000;
                if (m.advance_to(later)) check_distributions(m.outputs());
            }
        }
    }
    CHECK(checked > 20'000 / kStreamScale);
}

TEST_CASE("a goal never lowers the scoring side's chance to win or advance", "[property]") {
    StreamGenerator gen(777, kMatch);
    const int streams = 400 / kStreamScale;
    int compared = 0;
    for (int n = 0; n < streams; ++n) {
        const RandomStream s = gen.next();
        if (s.messages.size() < 3) continue;
        const std::size_t cut = 1 + static_cast<std::size_t>(gen.rng()() % (s.messages.size() - 1));
        Match before = replay(s, cut);
        const MatchState& st = before.state();
        if (st.status != MatchStatus::in_play) continue;
        for (Side side : {Side::home, Side::away}) {
            Match with_goal = replay(s, cut);
            Match without = replay(s, cut);
            InboundMessage m = s.messages[cut - 1];
            m.header.source_seq = 1'000'000;  // after everything in the stream
            m.header.clock = st.clock;
            m.body = Goal{side, false, false};
            REQUIRE(with_goal.apply(m).verdict == Verdict::accepted);
            m.body = ClockSync{st.clock_running};  // the same clock, nothing else
            REQUIRE(without.apply(m).verdict == Verdict::accepted);
            const Outputs& a = with_goal.outputs();
            const Outputs& b = without.outputs();
            INFO("stream " << n << " cut " << cut << " side " << side_name(side) << " period "
                           << period_name(st.period) << " clock " << st.clock.clock_ms);
            if (!is_extra_time(st.period)) {
                const double win_with = side == Side::home ? a.p_home : a.p_away;
                const double win_without = side == Side::home ? b.p_home : b.p_away;
                CHECK(win_with >= win_without - kSumTolerance);
            }
            if (a.has_advance) {
                const double adv_with = side == Side::home ? a.p_advance_home : a.p_advance_away;
                const double adv_without = side == Side::home ? b.p_advance_home : b.p_advance_away;
                CHECK(adv_with >= adv_without - kSumTolerance);
            }
            ++compared;
        }
    }
    CHECK(compared > 100 / kStreamScale);
}

TEST_CASE("at 0-0 the draw grows as the clock runs", "[property]") {
    std::mt19937_64 rng(4242);
    std::uniform_real_distribution<double> lambda(0.3, 3.0);
    const int positions = 300 / kStreamScale;
    for (int n = 0; n < positions; ++n) {
        MatchPosition pos;
        pos.prior = PriorMeans{lambda(rng), lambda(rng)};
        pos.reds = {static_cast<int>(rng() % 2), static_cast<int>(rng() % 2)};
        if (rng() % 3 == 0) {
            pos.format.extra_time = true;
            pos.format.shootout = true;
        }
        // Across the whole match through positions, and within a half by advancing the clock.
        double previous = -1.0;
        for (double minute : {0.0, 10.0, 30.0, 44.0, 46.0, 60.0, 75.0, 85.0, 89.0, 92.0}) {
            pos.clock = liveprob::test::at_minute(
                minute < 45.0 ? Period::first_half : Period::second_half, minute);
            ModelParams params;
            params.quadrature_nodes = 2 + n % 5;
            Match m = match_at(pos, params);
            INFO("position " << n << " minute " << minute);
            CHECK(m.outputs().p_draw >= previous - kSumTolerance);
            previous = m.outputs().p_draw;
            if (minute == 60.0) {
                double in_half = previous;
                for (double later = 61.0; later < 100.0; later += 3.0) {
                    REQUIRE(m.advance_to(liveprob::test::at_minute(Period::second_half, later)));
                    CHECK(m.outputs().p_draw >= in_half - kSumTolerance);
                    in_half = m.outputs().p_draw;
                }
            }
        }
    }
}

TEST_CASE("any permutation and duplication of a stream gives the identical state and outputs",
          "[property]") {
    StreamGenerator gen(31337, kMatch);
    const int streams = 1000 / kStreamScale;
    int late_seen = 0;
    for (int n = 0; n < streams; ++n) {
        const RandomStream s = gen.next();
        Match in_order(kMatch, s.setup, s.params);
        for (const auto& m : s.messages) (void)in_order.apply(m);

        std::vector<InboundMessage> arrivals = s.messages;
        std::size_t logged_twice = 0;  // a copy of a message wrong in itself is rejected again
        for (const auto& m : s.messages) {
            if (gen.rng()() % 5 != 0) continue;
            arrivals.push_back(m);  // duplicated on the wire
            const auto* shot = std::get_if<ShotXg>(&m.body);
            if (!(shot && std::isnan(shot->xg))) ++logged_twice;
        }
        std::shuffle(arrivals.begin(), arrivals.end(), gen.rng());
        Match shuffled(kMatch, s.setup, s.params);
        for (const auto& m : arrivals) (void)shuffled.apply(m);

        INFO("stream " << n << " of " << s.messages.size() << " messages");
        CHECK(shuffled.state() == in_order.state());
        CHECK(bitwise_same(shuffled.outputs(), in_order.outputs()));
        CHECK(shuffled.counters().duplicates == logged_twice);
        late_seen += shuffled.counters().late > 0 ? 1 : 0;
    }
    CHECK(late_seen > streams / 2);
}
