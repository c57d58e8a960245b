// The goal-timing profile fitted to the open international goal minutes: the second half
// holds more goals than the first (a fact of the trade, common practice), and the fitted
// profile reproduces the data's second-half share within its standard error. The stoppage
// factor from the championship files, which give stoppage minutes: the closed form against
// the multinomial maximum, and the trade's expectation that stoppage runs at about the end rate.
#include <catch2/catch.hpp>

#include <cmath>
#include <iostream>
#include <vector>

#include "liveprob/datasets/inplay_records.hpp"
#include "liveprob/datasets/match_timelines.hpp"
#include "liveprob/fit/goal_timing.hpp"
#include "test_env.hpp"

TEST_CASE("the fitted timing profile reproduces the second-half share of the goal minutes") {
    const auto dir = liveprob::test::open_data_dir() / "international";
    // Every match with complete goal records (no coverage filter: goalless ones add no minute).
    const auto read = liveprob::datasets::read_international_timelines(dir.string(), {0.0});
    REQUIRE(read.matches.size() > 5000);
    const auto counts = liveprob::datasets::regulation_minute_counts(read.matches);
    const auto fit = liveprob::fit::fit_goal_timing(counts, liveprob::core::TimingProfile{});
    std::cout << "matches " << read.matches.size() << " (left out " << read.skipped.total()
              << "), goals " << fit.goals << ", data second-half share "
              << fit.data_second_half_share << ", fitted " << fit.second_half_share << " (se "
              << fit.second_half_share_se << "), profile " << fit.profile.first_half_start << " "
              << fit.profile.first_half_end << " " << fit.profile.second_half_start << " "
              << fit.profile.second_half_end << " stoppage factor " << fit.profile.stoppage_factor
              << "\n";
    REQUIRE(fit.converged);
    // Common practice: more goals after half-time than before.
    CHECK(fit.data_second_half_share > 0.5);
    CHECK(std::abs(fit.second_half_share - fit.data_second_half_share) < fit.second_half_share_se);
    CHECK(fit.second_half_share_se > 0.0);
    // The rate rises through the match.
    CHECK(fit.profile.second_half_end > fit.profile.first_half_start);
}

TEST_CASE(
    "the stoppage factor from the championship files: the multinomial maximum, near the half's end "
    "rate") {
    const auto dir = liveprob::test::open_data_dir() / "euro";
    liveprob::datasets::StoppageCounts counts;
    for (const char* year : {"2020", "2024"}) {
        const auto read =
            liveprob::datasets::read_championship_timelines((dir / year / "euro.json").string());
        const auto more = liveprob::datasets::stoppage_counts(read.matches);
        counts.regulation_goals += more.regulation_goals;
        counts.stoppage_goals += more.stoppage_goals;
    }
    REQUIRE(counts.stoppage_goals > 10);
    const liveprob::core::TimingProfile shape;
    const auto fit =
        liveprob::fit::fit_stoppage_factor(counts.regulation_goals, counts.stoppage_goals, shape);
    std::cout << counts.stoppage_goals << " of " << counts.regulation_goals
              << " goals in stoppage: factor " << fit.factor << " (se " << fit.factor_se << ")\n";
    // The closed form is the maximum of the multinomial likelihood of the engine's minute shares,
    // with the stoppage goals in their own two cells (found here by golden-section search).
    auto log_likelihood = [&](double factor) {
        liveprob::core::TimingProfile p = shape;
        p.stoppage_factor = factor;
        const auto with = liveprob::fit::minute_shares(p);
        p.stoppage_factor = 0.0;
        const auto without = liveprob::fit::minute_shares(p);  // the 90 minutes alone, normalised
        // Share of all goals in the two stoppages, and of the rest spread as the minutes are.
        const double regular_total = with[0] / without[0];
        const double stoppage_share = 1.0 - regular_total;
        return counts.stoppage_goals * std::log(stoppage_share) +
               (counts.regulation_goals - counts.stoppage_goals) * std::log(regular_total);
    };
    double a = 0.01, b = 10.0;
    const double g = (std::sqrt(5.0) - 1.0) / 2.0;
    while (b - a > 1e-12) {
        const double c = b - g * (b - a), d = a + g * (b - a);
        if (log_likelihood(c) > log_likelihood(d)) b = d;
        else a = c;
    }
    // (A flat maximum: the search resolves it to about 1e-7.)
    CHECK(fit.factor == Approx(0.5 * (a + b)).epsilon(1e-6));
    // Common practice: stoppage time is played at about the rate of the end of its half.
    CHECK(std::abs(fit.factor - 1.0) < 2.0 * fit.factor_se);
}

TEST_CASE("time-decayed goal minutes: weights 2^(-age/half-life), scaled to Kish's effective n") {
    // Three goals: two in the latest match (minutes 10 and 90), one a half-life earlier
    // (minute 10). Weights 1, 1, 0.5: Σw = 2.5, Σw² = 2.25, Kish's effective sample size
    // (Σw)² / Σw² = 25/9 (Kish 1965, Survey Sampling, eq. 11.7.5); the counts are scaled by
    // Σw / Σw² = 10/9 so they sum to it.
    using liveprob::datasets::MatchTimeline;
    MatchTimeline old_match, new_match;
    old_match.day = 1000;
    new_match.day = 1000 + 1461;
    old_match.goals.push_back({.minute = 10});
    new_match.goals.push_back({.minute = 10});
    new_match.goals.push_back({.minute = 90, .stoppage = 3});
    const std::vector<MatchTimeline> matches = {old_match, new_match};
    const auto weighted = liveprob::datasets::regulation_minute_counts(matches, 1461.0);
    CHECK(weighted[9] == Approx(1.5 * 10.0 / 9.0).epsilon(1e-12));
    CHECK(weighted[89] == Approx(10.0 / 9.0).epsilon(1e-12));  // a stoppage goal stays at 90
    double total = 0.0;
    for (double c : weighted) total += c;
    CHECK(total == Approx(25.0 / 9.0).epsilon(1e-12));
    // No half-life: every goal counts once.
    const auto plain = liveprob::datasets::regulation_minute_counts(matches);
    CHECK(plain[9] == 2.0);
    CHECK(plain[89] == 1.0);
}
