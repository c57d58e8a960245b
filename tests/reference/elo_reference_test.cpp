// The naive Elo reference (replay-demo/backtest/elo_reference.hpp) against outside sources:
// - one Elo update worked by hand from the published formula (the Elo rating system for
//   national football teams as commonly published; constants from memory, as the issue states
//   them);
// - every pre-match rating difference of a decade of the open international results, and the
//   Poisson means map fitted on them, against tests/reference/elo_reference.py: the same formula
//   written again in Python, its map fitted by statsmodels' Poisson GLM (Debian's
//   python3-statsmodels);
// - the in-play outcome of independent Poisson goals against Boost.Math's Poisson distribution.
// Data: the open international dataset (its licence beside it).
#include <catch2/catch.hpp>

#include <fmt/format.h>
#include <boost/math/distributions/poisson.hpp>

#include <cmath>

#include "liveprob/backtest/elo_reference.hpp"
#include "liveprob/datasets/international_history.hpp"
#include "liveprob/fit/calendar.hpp"
#include "reference_lines.hpp"
#include "test_env.hpp"

namespace backtest = liveprob::backtest;
namespace test = liveprob::test;

TEST_CASE("Elo update: a hand-worked example of the published formula", "[elo]") {
    // Home 1600 against away 1500 at home: dr = 100 + 100 = 200, so
    // W_e = 1 / (10^(-200/400) + 1) = 1 / (0.3162278 + 1) = 0.7597469 (by hand).
    CHECK(backtest::elo_expected_result(200.0) == Approx(0.7597469).epsilon(1e-7));
    // A 3-0 home win in the world finals: K 60, G = (11 + 3) / 8 = 1.75,
    // points = 60 * 1.75 * (1 - 0.7597469) = 25.22658 (by hand).
    CHECK(backtest::elo_goal_multiplier(3) == 1.75);
    CHECK(backtest::elo_points_exchanged(200.0, 3, 0, 60.0) == Approx(25.22658).epsilon(1e-6));
    // Equal ratings, away win 1-2 in a qualifier: dr = 100 (home advantage),
    // W_e = 1 / (10^(-0.25) + 1) = 0.6400650, points = 40 * 1 * (0 - 0.6400650) = -25.60260.
    CHECK(backtest::elo_points_exchanged(100.0, 1, 2, 40.0) == Approx(-25.60260).epsilon(1e-6));
    // A two-goal margin: G = 1.5; a draw between equals at a neutral venue changes nothing.
    CHECK(backtest::elo_goal_multiplier(-2) == 1.5);
    CHECK(backtest::elo_points_exchanged(0.0, 1, 1, 20.0) == 0.0);
    // Match classes by competition name (invented names): the world finals are the competition
    // with the most qualifying results.
    const std::vector<std::string> names{"Coast Cup qualification",
                                         "Globe Cup qualification",
                                         "Globe Cup qualification",
                                         "Coast Cup",
                                         "Globe Cup",
                                         "Friendly"};
    const std::string finals = backtest::world_finals_in(names);
    CHECK(finals == "Globe Cup");
    CHECK(backtest::elo_match_class("Globe Cup", finals) == backtest::EloMatchClass::world_finals);
    CHECK(backtest::elo_match_class("Globe Cup qualification", finals) ==
          backtest::EloMatchClass::qualifier);
    CHECK(backtest::elo_match_class("Friendly", finals) == backtest::EloMatchClass::friendly);
    CHECK(backtest::elo_match_class("Coast Cup", finals) == backtest::EloMatchClass::tournament);

    // Two days: a result on day 1 moves both ratings by the same points; a fixture on day 1 is
    // priced before it, one on day 2 after it.
    std::vector<backtest::EloResult> results{
        {{1, "A", "B", 3, 0, false}, backtest::EloMatchClass::world_finals}};
    std::vector<backtest::EloFixture> fixtures{{1, "A", "B", false}, {2, "A", "B", true}};
    const auto ref = backtest::elo_reference(results, {}, fixtures);
    CHECK(ref.rating_difference[0] == 100.0);
    // After the 3-0: A gained 60 * 1.75 * (1 - W_e(100)) and B lost as much.
    const double gained = 60.0 * 1.75 * (1.0 - backtest::elo_expected_result(100.0));
    CHECK(ref.rating_difference[1] == Approx(2 * gained).epsilon(1e-12));
    CHECK_FALSE(ref.means[0]);  // no map without earlier years of results
}

TEST_CASE(
    "Elo reference: rating differences and goals map as in an independent Python "
    "implementation with statsmodels",
    "[elo][open-data]") {
    const auto dir = test::open_data_dir() / "international";
    const auto history = liveprob::datasets::read_international_history(dir.string());
    std::vector<std::string> names;
    for (const auto& r : history.results) names.push_back(r.competition);
    const std::string finals = backtest::world_finals_in(names);
    std::vector<backtest::EloResult> results;
    for (const auto& r : history.results)
        results.push_back({r.result, backtest::elo_match_class(r.competition, finals)});
    // Fixtures: every result of 2000-2009 (priced before its day, as the result itself is),
    // and one in 2010 whose map is fitted on exactly those ten years.
    const int from = liveprob::fit::day_number(2000, 1, 1),
              to = liveprob::fit::day_number(2010, 1, 1);
    std::vector<backtest::EloFixture> fixtures;
    std::vector<int> lines;
    for (const auto& r : history.results) {
        if (r.result.day < from || r.result.day >= to) continue;
        fixtures.push_back({r.result.day, r.result.home, r.result.away, r.result.neutral});
        lines.push_back(r.line);
    }
    fixtures.push_back({liveprob::fit::day_number(2010, 6, 1), "Harbour", "Millbrook", true});
    const std::vector<backtest::GoalMinute> minutes{{from, 10}, {from, 80}};
    const auto ref = backtest::elo_reference(results, minutes, fixtures);

    const auto script = test::source_dir() / "tests/reference/elo_reference.py";
    const auto run =
        test::run_command(fmt::format("{} {} {} 2000-01-01 2010-01-01", test::system_python(),
                                      script.string(), (dir / "results.csv").string()));
    REQUIRE(run.exit_code == 0);
    const auto python = test::parse_reference_lines(run.out);
    REQUIRE(python.at("n").value == static_cast<double>(lines.size()));
    double largest = 0.0;
    for (std::size_t i = 0; i < lines.size(); ++i)
        largest = std::max(largest, std::abs(ref.rating_difference[i] -
                                             python.at(fmt::format("dr{}", lines[i])).value));
    INFO(fmt::format("{} rating differences, largest gap {:.3g}", lines.size(), largest));
    CHECK(largest < 1e-8);

    const auto map2010 = std::find_if(ref.maps.begin(), ref.maps.end(),
                                      [](const auto& m) { return m.first == 2010; });
    REQUIRE(map2010 != ref.maps.end());
    const auto& m = map2010->second;
    CHECK(m.matches == lines.size());
    CHECK(m.home_intercept == Approx(python.at("home_intercept").value).margin(1e-8));
    CHECK(m.home_slope == Approx(python.at("home_slope").value).margin(1e-8));
    CHECK(m.away_intercept == Approx(python.at("away_intercept").value).margin(1e-8));
    CHECK(m.away_slope == Approx(python.at("away_slope").value).margin(1e-8));
    // The 2010 fixture's means are the map at its rating difference, the whole match to come.
    const auto& last = ref.means.back();
    REQUIRE(last);
    const auto expected = m.expected(ref.rating_difference.back());
    CHECK(last->home_goals == expected[0]);
    CHECK(last->away_goals == expected[1]);
    CHECK(last->remaining_share[0] == 1.0);
}

TEST_CASE("Elo reference: the remaining share of a goal-minute histogram at each bucket", "[elo]") {
    // One goal in each of the 90 minutes: at 15' 15 are seen; at 45' minutes 1-44 (the source's
    // minute 45 holds the first half's stoppage and comes after the 45:00 reading); at 90+ 1-89.
    std::array<double, 90> flat{};
    flat.fill(1.0);
    const auto share = backtest::remaining_share(flat);
    CHECK(share[0] == 1.0);
    CHECK(share[1] == Approx(75.0 / 90.0));
    CHECK(share[3] == Approx(46.0 / 90.0));
    CHECK(share[6] == Approx(5.0 / 90.0));
    CHECK(share[7] == Approx(1.0 / 90.0));
}

TEST_CASE(
    "Independent Poisson outcome from a standing score, against Boost.Math's Poisson "
    "distribution",
    "[elo]") {
    for (const auto& [score, home, away] :
         std::vector<std::tuple<std::array<int, 2>, double, double>>{
             {{0, 0}, 1.4, 1.1}, {{1, 0}, 0.6, 0.9}, {{0, 2}, 0.2, 0.05}, {{3, 3}, 2.5, 0.4}}) {
        boost::math::poisson_distribution<> ph(home), pa(away);
        double p_home = 0.0, p_draw = 0.0;
        for (int h = 0; h < 60; ++h)
            for (int a = 0; a < 60; ++a) {
                const double p = boost::math::pdf(ph, h) * boost::math::pdf(pa, a);
                const int lead = score[0] + h - score[1] - a;
                if (lead > 0) p_home += p;
                if (lead == 0) p_draw += p;
            }
        const auto f = backtest::independent_poisson_outcome(score, home, away);
        CHECK(f[0] == Approx(p_home).margin(1e-13));
        CHECK(f[1] == Approx(p_draw).margin(1e-13));
        CHECK(f[0] + f[1] + f[2] == Approx(1.0).margin(1e-15));
    }
}
