// The rating fit with ρ = 0 is a Poisson GLM: checked against statsmodels' GLM (Debian's
// python3-statsmodels, run here through /usr/bin/python3) on a real league season from the
// open data, coefficients, standard errors and log-likelihood within 1e-6. With the goal-level
// shrinkage it is a penalised GLM, checked against SciPy's BFGS on a log-likelihood written
// independently in tests/reference/level_shrinkage_reference.py.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <map>

#include "liveprob/datasets/results_readers.hpp"
#include "liveprob/fit/calendar.hpp"
#include "liveprob/fit/dixon_coles.hpp"
#include "reference_lines.hpp"
#include "test_env.hpp"

namespace fit = liveprob::fit;
namespace test = liveprob::test;

namespace {

// Writes the games as team indices (sorted names, as the fit orders them), runs statsmodels.
using Reference = test::ReferenceValue;

std::map<std::string, Reference> reference_fit(const std::vector<fit::MatchResult>& games,
                                               const fit::Ratings& ratings, double xi,
                                               int reference_day, const std::string& scratch_name,
                                               const std::string& script,
                                               const std::string& extra_arguments = "",
                                               double friendly_weight = 1.0) {
    const auto dir = test::scratch_dir(scratch_name);
    const auto csv = dir / "games.csv";
    std::ofstream out(csv);
    auto index_of = [&](const std::string& name) {
        const auto it = std::find_if(ratings.teams.begin(), ratings.teams.end(),
                                     [&](const auto& t) { return t.name == name; });
        return it - ratings.teams.begin();
    };
    for (const auto& g : games)
        out << fmt::format(
            "{},{},{},{},{},{:.17g}\n", index_of(g.home), index_of(g.away), g.home_goals,
            g.away_goals, g.neutral ? 1 : 0,
            std::exp(-xi * (reference_day - g.day)) * (g.friendly ? friendly_weight : 1.0));
    out.close();
    const auto result =
        test::run_command(fmt::format("{} {} {} {} {}", test::system_python(),
                                      (test::source_dir() / "tests/reference" / script).string(),
                                      csv.string(), ratings.teams.size(), extra_arguments));
    REQUIRE(result.exit_code == 0);
    return test::parse_reference_lines(result.out);
}

std::map<std::string, Reference> statsmodels_fit(const std::vector<fit::MatchResult>& games,
                                                 const fit::Ratings& ratings, double xi,
                                                 int reference_day,
                                                 const std::string& scratch_name) {
    return reference_fit(games, ratings, xi, reference_day, scratch_name,
                         "poisson_glm_reference.py");
}

void check_against_reference(const fit::Ratings& r, const std::map<std::string, Reference>& ref) {
    REQUIRE(ref.size() == 2 * r.teams.size() + 3);
    CHECK(r.intercept == Approx(ref.at("intercept").value).margin(1e-6));
    CHECK(r.home_advantage == Approx(ref.at("home").value).margin(1e-6));
    CHECK(r.intercept_se == Approx(ref.at("intercept").se).margin(1e-6));
    CHECK(r.home_advantage_se == Approx(ref.at("home").se).margin(1e-6));
    CHECK(r.diagnostics.log_likelihood == Approx(ref.at("loglik").value).margin(1e-6));
    for (std::size_t i = 0; i < r.teams.size(); ++i) {
        const auto& a = ref.at(fmt::format("attack{}", i));
        const auto& d = ref.at(fmt::format("defence{}", i));
        CHECK(r.teams[i].attack == Approx(a.value).margin(1e-6));
        CHECK(r.teams[i].defence == Approx(d.value).margin(1e-6));
        if (!std::isnan(a.se)) {
            CHECK(r.teams[i].attack_se == Approx(a.se).margin(1e-6));
            CHECK(r.teams[i].defence_se == Approx(d.se).margin(1e-6));
        }
    }
}

std::vector<fit::MatchResult> league_season() {
    const auto path = test::open_data_dir() / "leagues/2015-16/de.1.json";
    auto read = liveprob::datasets::read_league_json(path.string());
    REQUIRE(read.matches.size() == 306);  // 18 teams, every pair twice
    return read.matches;
}

}  // namespace

TEST_CASE("with xi = 0 and rho = 0 the rating fit equals statsmodels' Poisson GLM") {
    const auto games = league_season();
    fit::RatingsFitOptions options;
    const fit::Ratings r = fit::fit_ratings(games, options);
    REQUIRE(r.diagnostics.converged);
    REQUIRE(r.teams.size() == 18);
    const int reference_day = games.back().day + 1;
    check_against_reference(r, statsmodels_fit(games, r, 0.0, reference_day, "ratings_glm_plain"));
}

TEST_CASE(
    "with time decay the rating fit equals statsmodels' GLM with the same frequency weights") {
    const auto games = league_season();
    fit::RatingsFitOptions options;
    options.xi = 0.004;  // per day: a half-life of about 173 days
    options.min_weight = 0.0;
    const int reference_day = *fit::parse_iso_date("2016-06-01");
    options.as_of_day = reference_day;
    const fit::Ratings r = fit::fit_ratings(games, options);
    REQUIRE(r.diagnostics.converged);
    check_against_reference(
        r, statsmodels_fit(games, r, options.xi, reference_day, "ratings_glm_decay"));
}

TEST_CASE(
    "with the goal-level shrinkage the rating fit equals SciPy's optimum of the penalised "
    "likelihood") {
    const auto games = league_season();
    fit::RatingsFitOptions options;
    options.level_precision = 5.0;
    const fit::Ratings r = fit::fit_ratings(games, options);
    REQUIRE(r.diagnostics.converged);
    const int reference_day = games.back().day + 1;
    const auto ref = reference_fit(games, r, 0.0, reference_day, "ratings_level_shrinkage",
                                   "level_shrinkage_reference.py", "5.0");
    REQUIRE(ref.at("gradient_norm").value < 1e-7);  // SciPy reached the optimum
    CHECK(r.intercept == Approx(ref.at("intercept").value).margin(1e-6));
    CHECK(r.home_advantage == Approx(ref.at("home").value).margin(1e-6));
    double penalty = 0.0;
    for (std::size_t i = 0; i < r.teams.size(); ++i) {
        CHECK(r.teams[i].attack == Approx(ref.at(fmt::format("attack{}", i)).value).margin(1e-6));
        CHECK(r.teams[i].defence == Approx(ref.at(fmt::format("defence{}", i)).value).margin(1e-6));
        penalty +=
            0.5 * options.level_precision * std::pow(r.teams[i].attack - r.teams[i].defence, 2);
    }
    CHECK(r.diagnostics.log_likelihood - penalty == Approx(ref.at("objective").value).margin(1e-6));

    // What the shrinkage does: the spread of the goal levels a - d falls (a season holds about
    // 34 · 1.4 / 2 ≈ 24 of information on each team's a - d, so q = 5 pulls it by about a
    // sixth), that of the strengths a + d hardly.
    const fit::Ratings plain = fit::fit_ratings(games, fit::RatingsFitOptions{});
    auto spread = [](const fit::Ratings& x, double sign) {
        double s = 0.0;
        for (const auto& t : x.teams) s += std::pow(t.attack + sign * t.defence, 2);
        return std::sqrt(s / static_cast<double>(x.teams.size()));
    };
    CHECK(spread(r, -1.0) < 0.9 * spread(plain, -1.0));
    CHECK(spread(r, +1.0) > 0.97 * spread(plain, +1.0));
}

TEST_CASE("a friendly's weight is a frequency weight: the fit equals statsmodels' weighted GLM") {
    auto games = league_season();
    for (std::size_t i = 0; i < games.size(); i += 3) games[i].friendly = true;  // every third
    fit::RatingsFitOptions options;
    options.friendly_weight = 0.4;
    const fit::Ratings r = fit::fit_ratings(games, options);
    REQUIRE(r.diagnostics.converged);
    const int reference_day = games.back().day + 1;
    check_against_reference(r, reference_fit(games, r, 0.0, reference_day, "ratings_friendly",
                                             "poisson_glm_reference.py", "", 0.4));
}
