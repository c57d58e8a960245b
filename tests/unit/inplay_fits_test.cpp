// The in-play fits: the state exposures a match's goals give, and recovery of known parameters
// from matches simulated here (a simulator of the model's own assumptions, written apart from
// the estimators): score-state effects and κ with and without the listing condition, the
// extra-time factor with strength posteriors.
#include <catch2/catch.hpp>

#include <cmath>
#include <random>

#include "liveprob/core/timing.hpp"
#include "liveprob/fit/extra_time_fit.hpp"
#include "liveprob/fit/inplay_sample.hpp"
#include "liveprob/fit/score_state_fit.hpp"

namespace fit = liveprob::fit;
using liveprob::core::Side;

namespace {

constexpr std::size_t kLeading = 0, kLevel = 1, kTrailing = 2;

fit::InplayMatch match_with(std::vector<fit::InplayGoal> goals) {
    fit::InplayMatch m;
    m.prior = {1.4, 1.1};
    m.goals = std::move(goals);
    return m;
}

// A season of simulated matches: priors spread like international ones, θ ~ Gamma(κ, κ) per
// side, goals by competing exponential clocks in exposure time with the state multipliers.
struct Truth {
    std::array<double, 3> m{0.9, 1.0, 1.15};
    double kappa = 8.0;
};

std::vector<fit::RegulationRecord> simulate(const Truth& truth, int matches, unsigned seed,
                                            int* goalless = nullptr) {
    std::mt19937_64 rng(seed);
    std::uniform_real_distribution<double> prior(0.4, 2.6);
    std::gamma_distribution<double> theta(truth.kappa, 1.0 / truth.kappa);
    std::exponential_distribution<double> clock(1.0);
    std::uniform_real_distribution<double> unit(0.0, 1.0);
    std::vector<fit::RegulationRecord> out;
    for (int i = 0; i < matches; ++i) {
        fit::RegulationRecord r;
        std::array<double, 2> rate{};
        for (std::size_t s = 0; s < 2; ++s) {
            r.sides[s].prior = prior(rng);
            rate[s] = r.sides[s].prior * theta(rng);
        }
        std::array<int, 2> score{0, 0};
        double t = 0.0;
        while (true) {
            auto state = [&](std::size_t s) {
                return score[s] > score[1 - s]   ? kLeading
                       : score[s] < score[1 - s] ? kTrailing
                                                 : kLevel;
            };
            const double h0 = rate[0] * truth.m[state(0)], h1 = rate[1] * truth.m[state(1)];
            const double next = t + clock(rng) / (h0 + h1);
            const double until = std::min(next, 1.0);
            for (std::size_t s = 0; s < 2; ++s) r.sides[s].exposure[state(s)] += until - t;
            if (next >= 1.0) break;
            const std::size_t scorer = unit(rng) * (h0 + h1) < h0 ? 0 : 1;
            ++r.sides[scorer].goals[state(scorer)];
            ++score[scorer];
            t = next;
        }
        if (score[0] + score[1] == 0) {
            if (goalless) ++*goalless;
            continue;  // the source would not list it
        }
        r.listed_for_goals = true;
        out.push_back(r);
    }
    return out;
}

}  // namespace

TEST_CASE(
    "state exposures: a side's exposures sum to the match's, each goal counts in the state it was "
    "scored from") {
    const liveprob::core::TimingProfile timing;
    // 1-0 at 30', 1-1 at 60', 2-1 at 88'.
    const auto r = fit::regulation_record(
        match_with({{Side::home, 30}, {Side::away, 60}, {Side::home, 88}}), timing);
    for (const auto& side : r.sides) CHECK(side.total_exposure() == Approx(1.0).epsilon(1e-12));
    CHECK(r.sides[0].goals[kLevel] == 2);  // at 0-0 and at 1-1
    CHECK(r.sides[1].goals[kTrailing] == 1);
    CHECK(r.sides[0].exposure[kLeading] == Approx(r.sides[1].exposure[kTrailing]).epsilon(1e-12));
    // The level stretches: kick-off to 30' and 60' to 88', each goal in the middle of its
    // minute's exposure under the engine's own curve.
    const liveprob::core::TimingCurve curve(timing, liveprob::core::CompetitionFormat{});
    auto at = [&](liveprob::core::Period p, int minute) {
        auto to = [&](int m) {
            return curve.exposure({liveprob::core::Period::first_half, 0},
                                  {p, static_cast<std::uint32_t>(m * 60'000)});
        };
        return 0.5 * (to(minute - 1) + to(minute));
    };
    const double level = at(liveprob::core::Period::first_half, 30) +
                         at(liveprob::core::Period::second_half, 88) -
                         at(liveprob::core::Period::second_half, 60);
    CHECK(r.sides[0].exposure[kLevel] == Approx(level).epsilon(1e-9));
}

TEST_CASE("goals of one minute share it: never zero exposure between them") {
    const liveprob::core::TimingProfile timing;
    const std::vector<fit::InplayGoal> goals{{Side::home, 90}, {Side::away, 90}, {Side::away, 90}};
    const auto at = fit::goal_exposures(goals, timing);
    CHECK(at[0] < at[1]);
    CHECK(at[1] < at[2]);
    CHECK(at[2] < 1.0);
    const auto r = fit::regulation_record(match_with(goals), timing);
    CHECK(r.sides[1].goals[kTrailing] == 1);  // the away side's first came from 1-0 down
    CHECK(r.sides[1].goals[kLevel] == 1);
    CHECK(r.sides[1].exposure[kLevel] > 0.0);
}

TEST_CASE("extra time: the exposure before its first goal, with that goal's scorer") {
    const liveprob::core::TimingProfile timing;
    fit::InplayMatch m =
        match_with({{Side::home, 10}, {Side::away, 70}, {Side::away, 110}, {Side::home, 115}});
    m.extra_time = true;
    const auto r = fit::extra_time_record(m, timing);
    REQUIRE(r.first_scorer);
    CHECK(*r.first_scorer == Side::away);
    CHECK(r.exposure_to_first_goal > 0.0);
    CHECK(r.exposure_to_first_goal < r.extra_time_exposure);
    CHECK(r.regulation.sides[0].total_goals() == 1);  // extra-time goals are not regulation's
    m.goals.resize(2);
    CHECK(fit::extra_time_record(m, timing).exposure_to_first_goal ==
          Approx(r.extra_time_exposure).epsilon(1e-12));
}

TEST_CASE(
    "simulated matches listed for their goals: the conditioned fit recovers the effects and "
    "kappa") {
    const Truth truth;
    int goalless = 0;
    const auto records = simulate(truth, 20000, 42, &goalless);
    REQUIRE(goalless > 500);  // enough left out for the condition to matter
    const auto f = fit::fit_score_state(records);
    REQUIRE(f.converged);
    CHECK(std::abs(f.effects.leading - truth.m[0]) < 3.5 * f.leading_se);
    CHECK(std::abs(f.effects.level - truth.m[1]) < 3.5 * f.level_se);
    CHECK(std::abs(f.effects.trailing - truth.m[2]) < 3.5 * f.trailing_se);
    CHECK(std::abs(f.kappa - truth.kappa) < 3.5 * f.kappa_se);
    CHECK(f.listed_for_goals == static_cast<int>(records.size()));

    // Ignoring why the matches are listed overstates the level rate (the goalless ones are gone).
    fit::ScoreStateFitOptions ignore;
    ignore.condition_on_listing = false;
    const auto biased = fit::fit_score_state(records, ignore);
    CHECK(biased.effects.level - truth.m[1] > 3.0 * biased.level_se);
}

TEST_CASE("without dispersion in the data kappa is reported as infinity (plain Poisson)") {
    Truth truth;
    truth.kappa = 1e9;
    const auto f = fit::fit_score_state(simulate(truth, 4000, 7));
    CHECK(std::isinf(f.kappa));
    CHECK(f.dispersion_at_bound);
    CHECK(std::abs(f.effects.trailing - truth.m[2]) < 3.5 * f.trailing_se);
}

TEST_CASE("simulated extra time with strength posteriors: the factor is recovered") {
    const double kappa = 6.0, factor = 0.7;
    std::mt19937_64 rng(5);
    std::uniform_real_distribution<double> prior(0.5, 2.5);
    std::gamma_distribution<double> theta(kappa, 1.0 / kappa);
    std::exponential_distribution<double> clock(1.0);
    std::uniform_real_distribution<double> unit(0.0, 1.0);
    const double extra = 0.35;  // extra time's exposure at factor 1
    std::vector<fit::ExtraTimeRecord> records;
    while (records.size() < 20000) {
        fit::ExtraTimeRecord r;
        std::array<double, 2> rate{};
        for (std::size_t s = 0; s < 2; ++s) {
            auto& side = r.regulation.sides[s];
            side.prior = prior(rng);
            rate[s] = side.prior * theta(rng);
            side.exposure[kLevel] = 1.0;  // state effects of 1: only the goals matter
            side.goals[kLevel] = std::poisson_distribution<int>(rate[s])(rng);
        }
        if (r.regulation.sides[0].goals[kLevel] != r.regulation.sides[1].goals[kLevel])
            continue;  // not level
        r.extra_time_exposure = extra;
        const double wait = clock(rng) / (factor * (rate[0] + rate[1]));
        r.exposure_to_first_goal = std::min(wait, extra);
        if (wait < extra)
            r.first_scorer = unit(rng) * (rate[0] + rate[1]) < rate[0] ? Side::home : Side::away;
        records.push_back(r);
    }
    const auto f = fit::fit_extra_time_factor(records, {1.0, 1.0, 1.0}, kappa);
    REQUIRE(f.converged);
    CHECK(std::abs(f.factor - factor) < 3.5 * f.factor_se);
    CHECK(f.expected_first_goals == Approx(f.first_goals).epsilon(0.05));
}
