// Behaviour of the pricing model on hand-picked states: outputs are distributions, goals and
// the clock move them the right way, settled matches give the result, bad input is refused.
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>

#include "liveprob/core/intensity.hpp"
#include "liveprob/core/pricing.hpp"
#include "pricing_fixtures.hpp"

using namespace liveprob;

using namespace liveprob::core;
using liveprob::test::at_minute;
using liveprob::test::pricing_state;

namespace {

PricingState full_state(double lh, double la, MatchClock clock, int gh, int ga) {
    const ModelParams params;
    PricingState st = pricing_state(lh, la, clock, gh, ga);
    const StrengthPosterior h = strength_posterior(params, gh, lh * 0.4);
    const StrengthPosterior a = strength_posterior(params, ga, la * 0.4);
    st.theta_shape = {h.shape, a.shape};
    st.theta_rate = {h.rate, a.rate};
    return st;
}

void check_distributions(const Outputs& out) {
    CHECK(out.p_home + out.p_draw + out.p_away == Approx(1.0).margin(1e-12));
    CHECK(out.next_goal_home + out.next_goal_away + out.next_goal_none ==
          Approx(1.0).margin(1e-12));
    double grid = out.tail_mass;
    for (const auto& row : out.goals_added)
        for (double v : row) grid += v;
    CHECK(grid == Approx(1.0).margin(1e-12));
    if (out.has_advance)
        CHECK(out.p_advance_home + out.p_advance_away == Approx(1.0).margin(1e-12));
    for (int k = 1; k < kTotalsLines; ++k)
        CHECK(out.p_over[static_cast<std::size_t>(k)] <=
              out.p_over[static_cast<std::size_t>(k - 1)] + 1e-15);
}

}  // namespace

TEST_CASE("full model outputs are distributions in every phase") {
    PricingModel model{ModelParams{}};
    CompetitionFormat knockout;
    knockout.extra_time = true;
    knockout.shootout = true;
    const MatchClock clocks[] = {{Period::pre_match, 0},
                                 at_minute(Period::first_half, 12),
                                 at_minute(Period::second_half, 45),
                                 at_minute(Period::second_half, 93),
                                 at_minute(Period::extra_first, 97),
                                 at_minute(Period::extra_second, 118)};
    for (const MatchClock& c : clocks) {
        for (int gh = 0; gh <= 2; ++gh) {
            PricingState st = full_state(1.5, 1.2, c, gh, 1);
            st.reds = {gh == 2 ? 1 : 0, 0};
            st.format = knockout;
            Outputs out;
            model.price(st, out);
            check_distributions(out);
            CHECK(out.has_advance);
        }
    }
}

TEST_CASE("a goal for a side raises its chance to win, the clock at 0-0 raises the draw") {
    PricingModel model{ModelParams{}};
    Outputs before, after;
    model.price(full_state(1.4, 1.3, at_minute(Period::second_half, 60), 0, 0), before);
    model.price(full_state(1.4, 1.3, at_minute(Period::second_half, 60), 1, 0), after);
    CHECK(after.p_home > before.p_home);
    double last_draw = 0.0;
    for (double minute : {1.0, 20.0, 44.0, 46.0, 70.0, 89.0, 93.0}) {
        const Period p = minute <= 45 ? Period::first_half : Period::second_half;
        Outputs o;
        model.price(full_state(1.4, 1.3, at_minute(p, minute), 0, 0), o);
        CHECK(o.p_draw > last_draw);
        last_draw = o.p_draw;
    }
}

TEST_CASE("score-state effects: the trailing side scores more, so a lead is less safe") {
    ModelParams with = ModelParams::plain_poisson();
    with.score_state = ScoreStateEffects{};
    PricingModel effects(with);
    PricingModel plain(ModelParams::plain_poisson());
    const PricingState st = pricing_state(1.4, 1.4, at_minute(Period::second_half, 70), 1, 0);
    Outputs a, b;
    effects.price(st, a);
    plain.price(st, b);
    CHECK(a.next_goal_away > b.next_goal_away);
    CHECK(a.p_home < b.p_home);
    check_distributions(a);
}

TEST_CASE("settled matches give the result exactly") {
    PricingModel model{ModelParams{}};
    PricingState st = full_state(1.4, 1.3, {Period::finished, 0}, 2, 1);
    st.status = MatchStatus::finished;
    Outputs out;
    model.price(st, out);
    CHECK(out.p_home == 1.0);
    CHECK(out.p_draw == 0.0);
    CHECK(out.goals_added[0][0] == 1.0);
    CHECK(out.p_over[2] == 1.0);
    CHECK(out.p_over[3] == 0.0);
    CHECK(out.p_both_score == 1.0);
    CHECK(out.next_goal_none == 1.0);
    // A knock-out decided on kicks.
    st.goals = {1, 1};
    st.format.shootout = true;
    st.shootout.taken = {5, 5};
    st.shootout.scored = {3, 4};
    model.price(st, out);
    CHECK(out.p_draw == 1.0);
    CHECK(out.p_advance_away == 1.0);
}

TEST_CASE("second leg: the aggregate decides who advances") {
    PricingModel model{ModelParams{}};
    PricingState st = full_state(1.4, 1.2, at_minute(Period::second_half, 89), 1, 0);
    st.format.first_leg = FirstLegResult{0, 3};  // this match's home side lost the first leg 0-3
    st.format.extra_time = true;
    st.format.shootout = true;
    Outputs out;
    model.price(st, out);
    CHECK(out.p_home > 0.8);          // winning this match
    CHECK(out.p_advance_away > 0.8);  // but out on aggregate
    check_distributions(out);
}

TEST_CASE("during the shoot-out only the kicks matter") {
    PricingModel model{ModelParams{}};
    PricingState st = full_state(1.4, 1.2, {Period::shootout, 0}, 1, 1);
    st.status = MatchStatus::shootout;
    st.format.extra_time = true;
    st.format.shootout = true;
    st.shootout.first = Side::home;
    st.shootout.taken = {3, 3};
    st.shootout.scored = {3, 1};
    Outputs out;
    model.price(st, out);
    CHECK(out.p_advance_home > 0.9);
    CHECK(out.next_goal_none == 1.0);
    CHECK(out.p_draw == Approx(1.0));
}

TEST_CASE("bad input is refused with a clear error") {
    PricingModel model{ModelParams{}};
    Outputs out;
    PricingState st = full_state(-1.0, 1.2, {Period::pre_match, 0}, 0, 0);
    CHECK_THROWS_WITH(model.price(st, out), Catch::Contains("expected regulation goals"));
    st = full_state(1.0, 1.2, {Period::pre_match, 0}, 0, 0);
    st.theta_rate[0] = 0.0;
    CHECK_THROWS_AS(model.price(st, out), std::invalid_argument);
    ModelParams bad;
    bad.quadrature_nodes = 0;
    CHECK_THROWS_AS(PricingModel{bad}, std::invalid_argument);
    bad = ModelParams{};
    bad.shootout.conversion = 1.0;
    CHECK_THROWS_AS(PricingModel{bad}, std::invalid_argument);
}

TEST_CASE("no published probability is negative, even by a rounding error") {
    // Complements (1 - the rest) used to come out at -2.2e-16 for some states: a consumer that
    // checks p >= 0 (or takes a log) must never see that. Scan a grid of priors, minutes,
    // scores, both formats and both the full and the plain model.
    CompetitionFormat knockout;
    knockout.extra_time = true;
    knockout.shootout = true;
    int states = 0;
    for (const ModelParams& params : {ModelParams{}, ModelParams::plain_poisson()}) {
        PricingModel model{params};
        for (double lh : {0.2, 1.0, 3.0, 6.0, 10.0}) {
            for (double la : {0.2, 1.5, 10.0}) {
                for (int minute = 0; minute <= 95; minute += 5) {
                    for (int goals = 0; goals <= 2; ++goals) {
                        for (bool cup : {false, true}) {
                            const Period period =
                                minute < 45 ? Period::first_half : Period::second_half;
                            PricingState st =
                                full_state(lh, la, at_minute(period, minute), goals, 0);
                            if (cup) st.format = knockout;
                            Outputs out;
                            model.price(st, out);
                            ++states;
                            double lowest = std::min(
                                {out.p_home, out.p_draw, out.p_away, out.p_advance_home,
                                 out.p_advance_away, out.next_goal_home, out.next_goal_away,
                                 out.next_goal_none, out.p_both_score, out.tail_mass});
                            for (double p : out.p_over) lowest = std::min(lowest, p);
                            for (const auto& row : out.goals_added) {
                                for (double p : row) lowest = std::min(lowest, p);
                            }
                            INFO("prior " << lh << "," << la << " minute " << minute << " score "
                                          << goals << "-0 " << (cup ? "knockout" : "league"));
                            REQUIRE(lowest >= 0.0);
                        }
                    }
                }
            }
        }
    }
    CHECK(states == 2 * 5 * 3 * 20 * 3 * 2);
}
