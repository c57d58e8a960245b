// The in-play estimators against statsmodels (Debian's python3-statsmodels, run through
// /usr/bin/python3) on the open international goal minutes:
//  - score-state multipliers with κ = ∞ are a Poisson GLM with one coefficient per state and
//    offsets log(prior · exposure): coefficients, standard errors and log-likelihood;
//  - with one multiplier for all states and κ fitted, the side totals follow a negative-binomial
//    (NB2) regression with an intercept and offsets: log m, α = 1/κ and their standard errors;
//  - the extra-time factor with κ = ∞ is a Poisson GLM with an intercept and offsets
//    log((c_home + c_away) τ), and equals the closed form first goals / Σ (c_home + c_away) τ.
// The priors come from one rating fit on all the results (a check of the estimators, not a
// forecast), and the sample is the reader's default one (goalless matches of competitions and
// years with complete goal records included), so no match is conditioned on having a goal.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <cmath>
#include <fstream>
#include <map>

#include "liveprob/datasets/inplay_records.hpp"
#include "liveprob/datasets/match_timelines.hpp"
#include "liveprob/datasets/results_readers.hpp"
#include "liveprob/fit/calendar.hpp"
#include "liveprob/fit/dixon_coles.hpp"
#include "liveprob/fit/extra_time_fit.hpp"
#include "liveprob/fit/score_state_fit.hpp"
#include "reference_lines.hpp"
#include "test_env.hpp"

namespace fit = liveprob::fit;
namespace datasets = liveprob::datasets;
namespace test = liveprob::test;

namespace {

struct Sample {
    std::vector<fit::RegulationRecord> regulation;
    std::vector<fit::ExtraTimeRecord> extra_time;
};

// Built once: reading and the rating fit take a few seconds.
const Sample& open_data_sample() {
    static const Sample sample = [] {
        const auto dir = test::open_data_dir() / "international";
        const auto read = datasets::read_international_timelines(dir.string());
        const auto results =
            liveprob::datasets::read_international_results((dir / "results.csv").string());
        fit::RatingsFitOptions options;
        options.xi = std::log(2.0) / 730.0;
        options.min_matches = 6.0;
        options.min_weight = 0.01;
        options.standard_errors = false;
        options.as_of_day = fit::day_number(2016, 1, 1);
        // Ratings as of each decade's end keep the priors close to the teams of the time.
        std::map<int, fit::Ratings> by_decade;
        Sample s;
        const liveprob::core::TimingProfile timing;
        for (const auto& t : read.matches) {
            const int decade_end = fit::day_number(
                std::min(10 * (std::stoi(fit::iso_date(t.day).substr(0, 4)) / 10) + 10, 2016), 1,
                1);
            auto it = by_decade.find(decade_end);
            if (it == by_decade.end()) {
                options.as_of_day = decade_end;
                it =
                    by_decade.emplace(decade_end, fit::fit_ratings(results.matches, options)).first;
            }
            const fit::Ratings& r = it->second;
            const fit::TeamRating* home = r.find(t.home);
            const fit::TeamRating* away = r.find(t.away);
            if (!home || !away || home->shrunk || away->shrunk) continue;
            const auto e = fit::expected_goals(r, *home, *away, t.neutral);
            const auto match = datasets::inplay_match(t, {e.home, e.away}, false);
            s.regulation.push_back(fit::regulation_record(match, timing));
            if (t.extra_time && t.day >= fit::day_number(1970, 1, 1))
                s.extra_time.push_back(fit::extra_time_record(match, timing));
        }
        return s;
    }();
    return sample;
}

std::map<std::string, test::ReferenceValue> statsmodels(const std::string& kind,
                                                        const std::filesystem::path& csv) {
    const auto script = test::source_dir() / "tests/reference/inplay_glm_reference.py";
    const auto result = test::run_command(
        fmt::format("{} {} {} {}", test::system_python(), script.string(), kind, csv.string()));
    REQUIRE(result.exit_code == 0);
    return test::parse_reference_lines(result.out);
}

}  // namespace

TEST_CASE(
    "score-state multipliers with kappa = infinity equal statsmodels' Poisson GLM with offsets") {
    const auto& sample = open_data_sample();
    REQUIRE(sample.regulation.size() > 5000);
    fit::ScoreStateFitOptions options;
    options.fit_dispersion = false;
    const auto fitted = fit::fit_score_state(sample.regulation, options);
    REQUIRE(fitted.converged);

    const auto csv = test::scratch_dir("inplay_states") / "states.csv";
    std::ofstream out(csv);
    for (const auto& r : sample.regulation)
        for (const auto& side : r.sides)
            for (int s = 0; s < fit::kScoreStates; ++s)
                if (side.exposure[static_cast<std::size_t>(s)] > 0.0)
                    out << fmt::format("{},{},{:.17g},{:.17g}\n", s,
                                       side.goals[static_cast<std::size_t>(s)], side.prior,
                                       side.exposure[static_cast<std::size_t>(s)]);
    out.close();
    const auto ref = statsmodels("states", csv);
    CHECK(std::log(fitted.effects.leading) == Approx(ref.at("leading").value).margin(1e-6));
    CHECK(std::log(fitted.effects.level) == Approx(ref.at("level").value).margin(1e-6));
    CHECK(std::log(fitted.effects.trailing) == Approx(ref.at("trailing").value).margin(1e-6));
    // Standard errors on the log scale: se(m) / m.
    CHECK(fitted.leading_se / fitted.effects.leading == Approx(ref.at("leading").se).margin(1e-6));
    CHECK(fitted.level_se / fitted.effects.level == Approx(ref.at("level").se).margin(1e-6));
    CHECK(fitted.trailing_se / fitted.effects.trailing ==
          Approx(ref.at("trailing").se).margin(1e-6));
    CHECK(fitted.log_likelihood == Approx(ref.at("loglik").value).epsilon(1e-9));
}

TEST_CASE(
    "with one multiplier for all states, kappa equals statsmodels' negative-binomial regression") {
    const auto& sample = open_data_sample();
    fit::ScoreStateFitOptions options;
    options.common_multiplier = true;
    const auto fitted = fit::fit_score_state(sample.regulation, options);
    REQUIRE(fitted.converged);
    REQUIRE(std::isfinite(fitted.kappa));

    const auto csv = test::scratch_dir("inplay_totals") / "totals.csv";
    std::ofstream out(csv);
    for (const auto& r : sample.regulation)
        for (const auto& side : r.sides)
            out << fmt::format("{},{:.17g},{:.17g}\n", side.total_goals(), side.prior,
                               side.total_exposure());
    out.close();
    const auto ref = statsmodels("totals", csv);
    CHECK(std::log(fitted.effects.level) == Approx(ref.at("intercept").value).margin(1e-6));
    CHECK(fitted.effects.leading == fitted.effects.level);
    CHECK(1.0 / fitted.kappa == Approx(ref.at("alpha").value).margin(1e-6));
    CHECK(fitted.level_se / fitted.effects.level == Approx(ref.at("intercept").se).margin(1e-6));
    // se(α) = se(κ) / κ² (delta method).
    CHECK(fitted.kappa_se / (fitted.kappa * fitted.kappa) ==
          Approx(ref.at("alpha").se).margin(1e-6));
}

TEST_CASE(
    "the extra-time factor with kappa = infinity is the closed form and statsmodels' Poisson GLM") {
    const auto& sample = open_data_sample();
    REQUIRE(sample.extra_time.size() > 50);
    const liveprob::core::ScoreStateEffects effects{0.95, 1.0, 1.08};
    const double inf = std::numeric_limits<double>::infinity();
    const auto fitted = fit::fit_extra_time_factor(sample.extra_time, effects, inf);
    REQUIRE(fitted.converged);

    const auto csv = test::scratch_dir("inplay_extra") / "extra.csv";
    std::ofstream out(csv);
    double exposure = 0.0;
    for (const auto& r : sample.extra_time) {
        const double rate =
            (r.regulation.sides[0].prior + r.regulation.sides[1].prior) * effects.level;
        exposure += rate * r.exposure_to_first_goal;
        out << fmt::format("{},{:.17g}\n", r.first_scorer ? 1 : 0, rate * r.exposure_to_first_goal);
    }
    out.close();
    const double closed_form = fitted.first_goals / exposure;
    CHECK(fitted.factor == Approx(closed_form).epsilon(1e-9));
    CHECK(fitted.factor_se == Approx(closed_form / std::sqrt(fitted.first_goals)).epsilon(1e-6));
    const auto ref = statsmodels("extra", csv);
    CHECK(std::log(fitted.factor) == Approx(ref.at("intercept").value).margin(1e-6));
    CHECK(fitted.factor_se / fitted.factor == Approx(ref.at("intercept").se).margin(1e-6));
}
