// The rating fit: constraints, the as-of cut, shrinkage, warm starts, and recovery of known
// ratings from simulated seasons.
#include <catch2/catch.hpp>

#include <cmath>
#include <numeric>
#include <random>

#include "liveprob/fit/calendar.hpp"
#include "liveprob/fit/dixon_coles.hpp"

namespace fit = liveprob::fit;

namespace {

// A double round-robin among `teams` sides drawn from known ratings, `seasons` times over.
std::vector<fit::MatchResult> simulated(int teams, int seasons, unsigned seed, double home = 0.3) {
    std::mt19937 rng(seed);
    std::vector<fit::MatchResult> out;
    int day = fit::day_number(2001, 8, 1);
    for (int s = 0; s < seasons; ++s)
        for (int i = 0; i < teams; ++i)
            for (int j = 0; j < teams; ++j) {
                if (i == j) continue;
                const double ai = 0.04 * (i - teams / 2), dj = 0.03 * (j % 5 - 2);
                const double aj = 0.04 * (j - teams / 2), di = 0.03 * (i % 5 - 2);
                std::poisson_distribution<int> gh(std::exp(0.1 + home + ai - dj));
                std::poisson_distribution<int> ga(std::exp(0.1 + aj - di));
                out.push_back({day++, "side " + std::to_string(i), "side " + std::to_string(j),
                               gh(rng), ga(rng), false});
            }
    return out;
}

}  // namespace

TEST_CASE("attack and defence each sum to zero and the fit converges") {
    const auto games = simulated(12, 2, 7);
    const fit::Ratings r = fit::fit_ratings(games, {});
    REQUIRE(r.diagnostics.converged);
    double sa = 0.0, sd = 0.0;
    for (const auto& t : r.teams) {
        sa += t.attack;
        sd += t.defence;
        CHECK(t.attack_se > 0.0);
        CHECK(t.matches == 44);
    }
    CHECK(std::abs(sa) < 1e-12);
    CHECK(std::abs(sd) < 1e-12);
    CHECK(r.diagnostics.matches == static_cast<int>(games.size()));
}

TEST_CASE("many simulated seasons recover the home advantage and the intercept") {
    const auto games = simulated(10, 30, 11, 0.3);
    const fit::Ratings r = fit::fit_ratings(games, {});
    // Four standard errors: fails if the estimator is biased or the errors are far too small.
    CHECK(std::abs(r.home_advantage - 0.3) < 4.0 * r.home_advantage_se);
    CHECK(r.home_advantage_se < 0.05);
}

TEST_CASE("fitting as of a date never uses a match on or after it") {
    auto games = simulated(8, 2, 3);
    const int cut = games[60].day;
    fit::RatingsFitOptions options;
    options.as_of_day = cut;
    const fit::Ratings before = fit::fit_ratings(games, options);
    CHECK(before.diagnostics.matches == 60);
    // Rewrite everything on or after the cut: the fit must not change at all.
    for (std::size_t i = 60; i < games.size(); ++i) {
        games[i].home_goals = 9;
        games[i].away_goals = static_cast<int>(i % 4);
    }
    const fit::Ratings after = fit::fit_ratings(games, options);
    CHECK(after.intercept == before.intercept);
    CHECK(after.home_advantage == before.home_advantage);
    for (std::size_t i = 0; i < before.teams.size(); ++i)
        CHECK(after.teams[i].attack == before.teams[i].attack);
    // And a match the day before the cut does count.
    games[59].home_goals += 3;
    CHECK(fit::fit_ratings(games, options).intercept != before.intercept);
}

TEST_CASE("time decay weights recent matches more") {
    const auto games = simulated(8, 2, 5);
    fit::RatingsFitOptions options;
    options.xi = 0.01;
    const fit::Ratings r = fit::fit_ratings(games, options);
    for (const auto& t : r.teams) CHECK(t.weighted_matches < t.matches);
    CHECK(r.xi == 0.01);
}

TEST_CASE("a team with too few matches is shrunk and named in a warning") {
    auto games = simulated(8, 2, 9);
    games.push_back({games.back().day + 1, "newcomer", "side 0", 5, 0, false});
    fit::RatingsFitOptions options;
    options.min_matches = 5.0;
    const fit::Ratings shrunk = fit::fit_ratings(games, options);
    const fit::TeamRating* t = shrunk.find("newcomer");
    REQUIRE(t != nullptr);
    CHECK(t->shrunk);
    REQUIRE(shrunk.diagnostics.warnings.size() == 1);
    CHECK_THAT(shrunk.diagnostics.warnings[0], Catch::Contains("newcomer"));
    options.min_matches = 0.0;
    const fit::Ratings free_fit = fit::fit_ratings(games, options);
    CHECK(std::abs(t->attack) < std::abs(free_fit.find("newcomer")->attack));
}

TEST_CASE("a warm start reaches the same ratings") {
    const auto games = simulated(10, 2, 13);
    fit::RatingsFitOptions options;
    options.fit_rho = true;
    const fit::Ratings cold = fit::fit_ratings(games, options);
    options.start = &cold;
    const fit::Ratings warm = fit::fit_ratings(games, options);
    CHECK(warm.rho == Approx(cold.rho).margin(1e-8));
    CHECK(warm.teams[3].attack == Approx(cold.teams[3].attack).margin(1e-8));
    CHECK(warm.diagnostics.iterations < cold.diagnostics.iterations);
}

TEST_CASE("the fitted rho is where the Dixon-Coles log-likelihood peaks") {
    const auto games = simulated(10, 3, 17);
    fit::RatingsFitOptions options;
    options.fit_rho = true;
    const fit::Ratings r = fit::fit_ratings(games, options);
    REQUIRE(r.diagnostics.converged);
    CHECK(r.rho_se > 0.0);
    // Moving rho alone (ratings held) must not raise the likelihood.
    auto ll = [&](double rho) {
        double total = 0.0;
        for (const auto& g : games) {
            const auto e = fit::expected_goals(r, *r.find(g.home), *r.find(g.away), g.neutral);
            total +=
                g.home_goals * std::log(e.home) - e.home - std::lgamma(g.home_goals + 1.0) +
                g.away_goals * std::log(e.away) - e.away - std::lgamma(g.away_goals + 1.0) +
                std::log(fit::dixon_coles_tau(g.home_goals, g.away_goals, e.home, e.away, rho));
        }
        return total;
    };
    CHECK(ll(r.rho) == Approx(r.diagnostics.log_likelihood).epsilon(1e-12));
    CHECK(ll(r.rho) >= ll(r.rho + 1e-3));
    CHECK(ll(r.rho) >= ll(r.rho - 1e-3));
}

TEST_CASE("no usable match is a clear error") {
    const std::vector<fit::MatchResult> none;
    CHECK_THROWS_AS(fit::fit_ratings(none, {}), std::invalid_argument);
    auto games = simulated(4, 1, 1);
    fit::RatingsFitOptions options;
    options.as_of_day = games.front().day;
    CHECK_THROWS_WITH(fit::fit_ratings(games, options), Catch::Contains("as-of"));
}

TEST_CASE(
    "two groups of teams that never met: a warning, and each group rated as if fitted alone") {
    // Neutral venues: the home advantage, shared by both groups, would otherwise tie them.
    auto east = simulated(6, 2, 21);
    auto west = simulated(5, 2, 22);
    for (auto& g : east) g.neutral = true;
    for (auto& g : west) {
        g.home = "west " + g.home;
        g.away = "west " + g.away;
        g.neutral = true;
    }
    std::vector<fit::MatchResult> both = east;
    both.insert(both.end(), west.begin(), west.end());
    const fit::Ratings joint = fit::fit_ratings(both, {});
    REQUIRE(joint.diagnostics.converged);
    REQUIRE_FALSE(joint.diagnostics.warnings.empty());
    CHECK_THAT(joint.diagnostics.warnings.back(), Catch::Contains("2 groups"));
    // Within a group the expected goals are identified: they equal the group's own fit.
    const fit::Ratings alone = fit::fit_ratings(west, {});
    for (const auto& h : alone.teams)
        for (const auto& a : alone.teams) {
            if (h.name == a.name) continue;
            const auto e_alone = fit::expected_goals(alone, h, a, true);
            const auto e_joint =
                fit::expected_goals(joint, *joint.find(h.name), *joint.find(a.name), true);
            CHECK(e_joint.home == Approx(e_alone.home).epsilon(1e-5));
            CHECK(e_joint.away == Approx(e_alone.away).epsilon(1e-5));
        }
}

TEST_CASE("a warm start from a fit that could not converge falls back to a cold start") {
    // One goalless match: no finite maximum, the fit runs off toward zero goals.
    std::vector<fit::MatchResult> games = {
        {fit::day_number(2001, 1, 1), "side 0", "side 1", 0, 0, false}};
    const fit::Ratings diverged = fit::fit_ratings(games, {});
    CHECK_FALSE(diverged.diagnostics.converged);
    auto more = simulated(6, 1, 31);
    games.insert(games.end(), more.begin(), more.end());
    fit::RatingsFitOptions options;
    options.start = &diverged;
    const fit::Ratings warm = fit::fit_ratings(games, options);
    CHECK(warm.diagnostics.converged);
    CHECK(warm.diagnostics.log_likelihood ==
          Approx(fit::fit_ratings(games, {}).diagnostics.log_likelihood).epsilon(1e-10));
}

TEST_CASE("dates round-trip through day numbers and bad dates are refused") {
    CHECK(fit::day_number(1970, 1, 1) == 0);
    CHECK(fit::parse_iso_date("2000-03-01") == fit::day_number(2000, 3, 1));
    CHECK(*fit::parse_iso_date("2000-03-01") - *fit::parse_iso_date("2000-02-28") ==
          2);  // leap year
    CHECK(fit::iso_date(fit::day_number(1872, 11, 30)) == "1872-11-30");
    CHECK_FALSE(fit::parse_iso_date("1999-02-29"));
    CHECK_FALSE(fit::parse_iso_date("2001-13-01"));
    CHECK_FALSE(fit::parse_iso_date("01/02/2003"));
}
