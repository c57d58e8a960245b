// The goal-timing profile fitted to the open international goal minutes: the second half
// holds more goals than the first (a fact of the trade, common practice), and the fitted
// profile reproduces the data's second-half share within its standard error.
#include <catch2/catch.hpp>

#include <iostream>

#include "liveprob/adapters/goal_minutes_reader.hpp"
#include "liveprob/engine/fit/goal_timing.hpp"
#include "test_env.hpp"

TEST_CASE("the fitted timing profile reproduces the second-half share of the goal minutes") {
    const auto dir = liveprob::test::open_data_dir() / "international";
    const auto read = liveprob::read_regulation_goal_minutes((dir / "results.csv").string(),
                                                             (dir / "goalscorers.csv").string());
    REQUIRE(read.matches_used > 5000);
    const auto fit = liveprob::fit::fit_goal_timing(read.counts, liveprob::TimingProfile{});
    std::cout << "matches " << read.matches_used << " (skipped " << read.matches_skipped << "), goals " << fit.goals
              << ", data second-half share " << fit.data_second_half_share << ", fitted " << fit.second_half_share
              << " (se " << fit.second_half_share_se << "), profile " << fit.profile.first_half_start << " "
              << fit.profile.first_half_end << " " << fit.profile.second_half_start << " "
              << fit.profile.second_half_end << " stoppage factor " << fit.profile.stoppage_factor << "\n";
    REQUIRE(fit.converged);
    // Common practice: more goals after half-time than before.
    CHECK(fit.data_second_half_share > 0.5);
    CHECK(std::abs(fit.second_half_share - fit.data_second_half_share) < fit.second_half_share_se);
    CHECK(fit.second_half_share_se > 0.0);
    // The rate rises through the match.
    CHECK(fit.profile.second_half_end > fit.profile.first_half_start);
}
