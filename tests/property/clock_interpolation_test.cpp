// Re-pricing between messages from an interpolant in the clock (Match::set_clock_interpolation,
// engine/core/internal/liveprob/core/clock_interpolant.hpp) against the exact solve, over
// random match streams (seeded) with random parameters: between every two messages the clock is
// ticked on, and every output of the interpolating match must lie within 1e-12 of an exact
// twin's, its distributions summing to 1 within 1e-12. The streams cross every kind of window
// edge: a message, the nominal end of each half and of extra time, the point where the overrun
// takes over from the stoppage (announced or expected), the end of the period's allowance.
// The reference is the project's own exact solve, itself checked against outside sources
// (tests/reference); what is tested here is that the interpolation adds nothing to it.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <limits>

#include "liveprob/core/clock_interpolant.hpp"
#include "liveprob/core/match.hpp"
#include "liveprob/core/pricing.hpp"
#include "liveprob/core/timing.hpp"
#include "random_match_stream.hpp"

using namespace liveprob;
using namespace liveprob::core;
using liveprob::test::kStreamScale;
using liveprob::test::StreamGenerator;

namespace {

constexpr double kTolerance = 1e-12;

// The largest difference between two sets of outputs over every value that moves with the
// clock; the fields that do not (status, clock, score, cards, counts) must be equal.
double largest_difference(const Outputs& a, const Outputs& b) {
    REQUIRE(a.status == b.status);
    REQUIRE(a.clock == b.clock);
    REQUIRE(a.home_goals == b.home_goals);
    REQUIRE(a.away_goals == b.away_goals);
    REQUIRE(a.home_reds == b.home_reds);
    REQUIRE(a.away_reds == b.away_reds);
    REQUIRE(a.has_advance == b.has_advance);
    REQUIRE(a.events_applied == b.events_applied);
    double worst = 0.0;
    auto diff = [&](double x, double y) { worst = std::max(worst, std::abs(x - y)); };
    diff(a.p_home, b.p_home);
    diff(a.p_draw, b.p_draw);
    diff(a.p_away, b.p_away);
    diff(a.p_advance_home, b.p_advance_home);
    diff(a.p_advance_away, b.p_advance_away);
    diff(a.expected_home_goals, b.expected_home_goals);
    diff(a.expected_away_goals, b.expected_away_goals);
    diff(a.next_goal_home, b.next_goal_home);
    diff(a.next_goal_away, b.next_goal_away);
    diff(a.next_goal_none, b.next_goal_none);
    for (std::size_t k = 0; k < a.p_over.size(); ++k) diff(a.p_over[k], b.p_over[k]);
    diff(a.p_both_score, b.p_both_score);
    for (std::size_t i = 0; i < a.goals_added.size(); ++i) {
        for (std::size_t j = 0; j < a.goals_added[i].size(); ++j)
            diff(a.goals_added[i][j], b.goals_added[i][j]);
    }
    diff(a.tail_mass, b.tail_mass);
    return worst;
}

double largest_sum_error(const Outputs& o) {
    double grid = o.tail_mass;
    for (const auto& row : o.goals_added) {
        for (double v : row) grid += v;
    }
    double worst = std::max(std::abs(o.p_home + o.p_draw + o.p_away - 1.0),
                            std::abs(o.next_goal_home + o.next_goal_away + o.next_goal_none - 1.0));
    worst = std::max(worst, std::abs(grid - 1.0));
    if (o.has_advance) worst = std::max(worst, std::abs(o.p_advance_home + o.p_advance_away - 1.0));
    return worst;
}

bool same_bits(const Outputs& a, const Outputs& b) {
    return a.p_home == b.p_home && a.p_draw == b.p_draw && a.goals_added == b.goals_added &&
           a.p_over == b.p_over && a.tail_mass == b.tail_mass;
}

}  // namespace

TEST_CASE("between messages, the interpolated outputs stay within 1e-12 of the exact solve",
          "[interpolation][property]") {
    StreamGenerator generator(20261203, 61);
    const int streams = 100 / kStreamScale;
    constexpr std::uint32_t kTickMs = 3'000;  // a tick every 3 s of match clock
    double worst = 0.0;
    double worst_sum = 0.0;
    long ticks = 0;
    long interpolated = 0;  // ticks whose outputs differ in some bit from the exact solve
    long windows = 0;       // stretches of such ticks (each one window, at least)
    for (int s = 0; s < streams; ++s) {
        const auto stream = generator.next();
        Match exact(61, stream.setup, stream.params);
        Match drifting(61, stream.setup, stream.params);
        drifting.set_clock_interpolation(true);
        Outputs a;
        Outputs b;
        for (std::size_t m = 0; m < stream.messages.size(); ++m) {
            (void)exact.apply(stream.messages[m]);
            (void)drifting.apply(stream.messages[m]);
            if (m + 1 == stream.messages.size()) break;
            const MatchClock from = exact.priced_clock();
            const MatchClock to = stream.messages[m + 1].header.clock;
            if (to.period != from.period) continue;
            bool previous = false;
            for (std::uint32_t t = from.clock_ms; t <= to.clock_ms; t += kTickMs) {
                const bool moved = exact.advance_to({from.period, t});
                REQUIRE(drifting.advance_to({from.period, t}) == moved);
                exact.price_into(a);
                drifting.price_into(b);
                const double d = largest_difference(a, b);
                if (d > kTolerance) {
                    INFO("stream " << s << " message " << m << " period "
                                   << static_cast<int>(from.period) << " clock " << t);
                    CHECK(d <= kTolerance);
                }
                worst = std::max(worst, d);
                worst_sum = std::max(worst_sum, largest_sum_error(b));
                ticks += 1;
                const bool now = !same_bits(a, b);
                interpolated += now ? 1 : 0;
                windows += now && !previous ? 1 : 0;
                previous = now;
            }
        }
    }
    WARN("ticks " << ticks << ", interpolated " << interpolated << " in " << windows
                  << " windows, largest difference " << worst << ", largest sum error "
                  << worst_sum);
    CHECK(worst <= kTolerance);
    CHECK(worst_sum <= kTolerance);
    // The interpolation must actually run: most ticks come after their window filled.
    CHECK(interpolated * 2 > ticks);
}

TEST_CASE("a clock sync keeps the interpolation window, a goal starts a new one",
          "[interpolation]") {
    MatchSetup setup;
    setup.prior = PriorMeans{1.5, 1.1};
    const ModelParams params;
    Match exact(7, setup, params);
    Match drifting(7, setup, params);
    drifting.set_clock_interpolation(true);
    liveprob::test::FeedBuilder feed(7);
    auto apply = [&](const InboundMessage& m) {
        REQUIRE(exact.apply(m).verdict == Verdict::accepted);
        REQUIRE(drifting.apply(m).verdict == Verdict::accepted);
    };
    Outputs a;
    Outputs b;
    auto tick = [&](std::uint32_t second) {
        const MatchClock at{Period::first_half, second * 1'000};
        REQUIRE(exact.advance_to(at));
        REQUIRE(drifting.advance_to(at));
        exact.price_into(a);
        drifting.price_into(b);
        REQUIRE(largest_difference(a, b) <= kTolerance);
    };
    apply(feed.start(Period::first_half, 0.0));
    // 13 node solves and the check, one per tick: from the 15th tick on the window prices.
    for (std::uint32_t s = 1; s <= 15; ++s) tick(s);
    REQUIRE_FALSE(same_bits(a, b));

    apply(feed.next(ClockSync{true}, liveprob::test::at_minute(Period::first_half, 20.0 / 60)));
    tick(21);
    CHECK_FALSE(same_bits(a, b));  // still interpolated: the sync moved only the clock

    apply(feed.goal(Side::home, Period::first_half, 25.0 / 60));
    tick(26);
    CHECK(same_bits(a, b));  // a new window: exact while it fills
}

TEST_CASE("a window that spans a kink of the timing profile fails its check and is not used",
          "[interpolation]") {
    // A first half at 1-0 from 40:00 to 47:00: across the nominal end at 45:00 the rate turns
    // to the stoppage rate, so no polynomial follows it to 1e-12; the check must say so.
    ModelParams params;
    PricingModel model(params);
    PricingState st;
    st.prior = {1.5, 1.1};
    st.status = MatchStatus::in_play;
    st.goals = {1, 0};
    const double inf = std::numeric_limits<double>::infinity();
    st.theta_shape = {inf, inf};
    st.theta_rate = {inf, inf};
    auto fill = [&](ClockInterpolant& ip) {
        Outputs out;
        while (ip.wants_solve()) {
            st.clock = ip.next_solve();
            model.price(st, out);
            ip.record(out);
        }
    };
    ClockInterpolant across;
    across.begin(1, Period::first_half, 40 * 60'000, 47 * 60'000);
    fill(across);
    CHECK_FALSE(across.ready());
    CHECK(across.failed_checks() == 1);

    // The same state up to the kink the timing curve names is fine.
    const TimingCurve curve(params.timing, CompetitionFormat{});
    const std::uint32_t kink = curve.smooth_until_ms({Period::first_half, 40 * 60'000}, {});
    CHECK(kink == 45 * 60'000);
    ClockInterpolant before;
    before.begin(1, Period::first_half, 40 * 60'000, kink);
    fill(before);
    REQUIRE(before.ready());
    Outputs exact;
    Outputs interpolated;
    st.clock = {Period::first_half, 43 * 60'000 + 123};
    model.price(st, exact);
    before.evaluate(st.clock.clock_ms, interpolated);
    interpolated.status = exact.status;
    interpolated.clock = exact.clock;
    interpolated.home_goals = exact.home_goals;
    interpolated.away_goals = exact.away_goals;
    interpolated.events_applied = exact.events_applied;
    CHECK(largest_difference(exact, interpolated) <= kTolerance);
}

TEST_CASE("the timing curve names each kink of its stretches", "[interpolation][timing]") {
    TimingProfile profile;  // expected stoppage 2.5 / 5.0 minutes, overrun 0.5
    const TimingCurve curve(profile, CompetitionFormat{});
    // Inside a half: its nominal end.
    CHECK(curve.smooth_until_ms({Period::first_half, 0}, {}) == 45 * 60'000);
    CHECK(curve.smooth_until_ms({Period::second_half, 70 * 60'000}, {}) == 90 * 60'000);
    // In stoppage: where the overrun takes over, end + stoppage - overrun.
    CHECK(curve.smooth_until_ms({Period::first_half, 45 * 60'000}, {}) == 47 * 60'000);
    CHECK(curve.smooth_until_ms({Period::second_half, 91 * 60'000}, 3.0) ==
          static_cast<std::uint32_t>(92.5 * 60'000));
    // Past that, smooth to the end of the period.
    CHECK(curve.smooth_until_ms({Period::second_half, 93 * 60'000}, 3.0) ==
          std::numeric_limits<std::uint32_t>::max());
}
