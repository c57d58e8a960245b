// Walk-forward priors on the invented demo season (380 matches, 38 match days): no prior ever
// depends on a result of its own day or later; the same priors on any number of threads; and
// splitting the refits into chains moves a prior only within the fit's convergence tolerance.
#include <catch2/catch.hpp>

#include <cmath>

#include "liveprob/backtest/walk_forward_priors.hpp"
#include "liveprob/demo/demo_season.hpp"

using namespace liveprob;

using namespace liveprob::core;
using namespace liveprob::backtest;
using namespace liveprob::demo;

namespace {

constexpr std::int64_t kDayUs = 86'400'000'000LL;

struct Season {
    std::vector<fit::MatchResult> results;
    std::vector<FixtureToPrice> fixtures;
};

Season demo_results() {
    const auto league = make_demo_league(21);
    const auto season = simulate_demo_season(league, 21);
    Season out;
    for (const auto& m : season.league) {
        const auto& setup = std::get<MatchSetup>(m.messages.front().body);
        const int day = static_cast<int>(setup.scheduled_kickoff_us / kDayUs);
        out.results.push_back({day, setup.home_name, setup.away_name, m.regulation_goals[0],
                               m.regulation_goals[1], false});
        out.fixtures.push_back({day, setup.home_name, setup.away_name, false, {}, {}});
    }
    return out;
}

WalkForwardOptions options(unsigned chains, unsigned threads) {
    WalkForwardOptions o;
    o.fit.xi = std::log(2.0) / 365.0;
    o.fit.min_matches = 3.0;
    o.fit.standard_errors = false;
    o.chains = chains;
    o.threads = threads;
    return o;
}

}  // namespace

TEST_CASE("walk-forward priors use only the results before each match's day", "[walk-forward]") {
    Season season = demo_results();
    const auto before = walk_forward_priors(season.results, season.fixtures, options(2, 2));
    CHECK(before.refits == 37);      // every match day but the first, which has no history
    CHECK(before.no_history == 10);  // the first round
    // Rewrite every result from round 20 on: the priors of the matches up to round 20 itself stay
    // exactly as they were; later ones move.
    const int cut = season.fixtures[190].day;
    for (auto& r : season.results)
        if (r.day >= cut) std::swap(r.home_goals, r.away_goals), r.home_goals += 2;
    const auto after = walk_forward_priors(season.results, season.fixtures, options(2, 2));
    std::size_t moved = 0;
    for (std::size_t i = 0; i < season.fixtures.size(); ++i) {
        if (season.fixtures[i].day <= cut) {
            CHECK(after.priors[i] == before.priors[i]);
        } else {
            if (!(after.priors[i] == before.priors[i])) ++moved;
        }
    }
    CHECK(moved == 180);
}

TEST_CASE(
    "walk-forward priors: the same on 1 and 2 threads, chains agree within the fit's tolerance",
    "[walk-forward][threads]") {
    const Season season = demo_results();
    const auto one = walk_forward_priors(season.results, season.fixtures, options(2, 1));
    const auto two = walk_forward_priors(season.results, season.fixtures, options(2, 2));
    CHECK(one.priors == two.priors);
    CHECK(one.both_sides_rated == two.both_sides_rated);
    const auto single = walk_forward_priors(season.results, season.fixtures, options(1, 1));
    const auto many = walk_forward_priors(season.results, season.fixtures, options(5, 2));
    CHECK(single.refits == many.refits);
    for (std::size_t i = 0; i < season.fixtures.size(); ++i) {
        CHECK(many.priors[i].home_goals == Approx(single.priors[i].home_goals).epsilon(1e-8));
        CHECK(many.priors[i].away_goals == Approx(single.priors[i].away_goals).epsilon(1e-8));
    }
}
