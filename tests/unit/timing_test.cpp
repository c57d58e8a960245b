#include <catch2/catch.hpp>

#include "liveprob/core/timing.hpp"
#include "pricing_fixtures.hpp"

using namespace liveprob;

using namespace liveprob::core;
using liveprob::test::at_minute;

namespace {
// The profile the arithmetic below is written for (not the fitted defaults): rates 0.85 to 1
// and 1 to 1.25, stoppage at the half's end rate, extra time at 0.85 of the end rate.
TimingProfile stated_profile() {
    TimingProfile p;
    p.first_half_start = 0.85;
    p.first_half_end = 1.0;
    p.second_half_start = 1.0;
    p.second_half_end = 1.25;
    p.stoppage_factor = 1.0;
    p.extra_time_factor = 0.85;
    return p;
}
}  // namespace

TEST_CASE("a whole regulation match carries exposure 1") {
    const TimingProfile profile = stated_profile();
    const TimingCurve curve(profile, CompetitionFormat{});
    CHECK(curve.remaining_regulation({Period::pre_match, 0}, std::nullopt) ==
          Approx(1.0).epsilon(1e-15));
    // Pieces add up: kick-off to 30', 30' to the end.
    const MatchClock m30 = at_minute(Period::first_half, 30);
    const double head = curve.exposure({Period::first_half, 0}, m30);
    CHECK(head + curve.remaining_regulation(m30, std::nullopt) == Approx(1.0).epsilon(1e-14));
    // Share after half-time follows the profile: (45 (1 + 1.25)/2 + 5 · 1.25) / total.
    const double second =
        curve.remaining_regulation({Period::second_half, 45 * 60'000}, std::nullopt);
    const double expected =
        (45 * 1.125 + 5 * 1.25) / (45 * 1.125 + 5 * 1.25 + 45 * 0.925 + 2.5 * 1.0);
    CHECK(second == Approx(expected).epsilon(1e-13));
}

TEST_CASE("the rate rises through the match and stoppage runs at the half's end rate") {
    const TimingCurve curve(stated_profile(), CompetitionFormat{});
    CHECK(curve.rate(at_minute(Period::first_half, 1)) <
          curve.rate(at_minute(Period::first_half, 40)));
    CHECK(curve.rate(at_minute(Period::second_half, 50)) <
          curve.rate(at_minute(Period::second_half, 85)));
    CHECK(curve.rate(at_minute(Period::first_half, 46.5)) ==
          Approx(curve.rate(at_minute(Period::first_half, 45))));
    CHECK(curve.rate({Period::pre_match, 0}) == 0.0);
}

TEST_CASE("announced stoppage extends the half, and past it a small overrun remains") {
    const TimingProfile profile;
    const TimingCurve curve(profile, CompetitionFormat{});
    const MatchClock m90 = at_minute(Period::second_half, 90);
    const double expected = curve.remaining_regulation(m90, std::nullopt);
    const double seven = curve.remaining_regulation(m90, 7.0);
    CHECK(seven == Approx(expected * 7.0 / profile.expected_stoppage_second).epsilon(1e-12));
    const MatchClock late = at_minute(Period::second_half, 98);
    const double overrun = curve.remaining_regulation(late, 7.0);
    CHECK(overrun == Approx(curve.rate(late) * profile.overrun_minutes).epsilon(1e-12));
    CHECK(curve.remaining_regulation(at_minute(Period::second_half, 96.8), 7.0) == Approx(overrun));
}

TEST_CASE("extra time: its own exposure, and none in a league format") {
    const TimingProfile profile = stated_profile();
    CompetitionFormat knockout;
    knockout.extra_time = true;
    const TimingCurve curve(profile, knockout);
    const double et = curve.remaining_extra_time({Period::second_half, 80 * 60'000}, std::nullopt);
    // 2 x (15 + 1) minutes at extra_time_factor x the second half's end rate.
    const double per_minute =
        curve.rate(at_minute(Period::second_half, 90)) * profile.extra_time_factor;
    CHECK(et == Approx(32 * per_minute).epsilon(1e-12));
    CHECK(curve.remaining_regulation(at_minute(Period::extra_first, 100), std::nullopt) == 0.0);
    const TimingCurve league(profile, CompetitionFormat{});
    CHECK(league.remaining_extra_time({Period::pre_match, 0}, std::nullopt) == 0.0);
}

TEST_CASE("bad timing profiles are rejected") {
    TimingProfile profile;
    profile.first_half_start = -1;
    CHECK_THROWS_AS(TimingCurve(profile, CompetitionFormat{}), std::invalid_argument);
}
