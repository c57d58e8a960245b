// Gamma strength update without state effects: each side's goals to come are negative
// binomial, NB(shape, rate / (rate + mean)). Checked against SciPy (scipy.stats.nbinom,
// Debian's python3-scipy) and Boost.Math (boost/math/distributions/negative_binomial.hpp).
#include <boost/math/distributions/negative_binomial.hpp>
#include <catch2/catch.hpp>

#include <cstdio>
#include <string>

#include "liveprob/core/pricing.hpp"
#include "liveprob/core/timing.hpp"
#include "pricing_fixtures.hpp"

using namespace liveprob;

using namespace liveprob::core;
using liveprob::test::at_minute;
using liveprob::test::pricing_state;
using liveprob::test::scipy_values;

namespace {

ModelParams gamma_no_state_effects() {
    ModelParams p = ModelParams::plain_poisson();
    p.kappa = 25.0;
    p.red_cards = RedCardEffects{};  // constant within the horizon: no coupling
    return p;
}

std::string num(double v) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.17g", v);
    return buf;
}

// Marginal of the grid for one side (rows for home, columns for away).
double marginal(const Outputs& out, bool home, std::size_t k) {
    double m = 0.0;
    for (std::size_t o = 0; o < kGrid; ++o)
        m += home ? out.goals_added[k][o] : out.goals_added[o][k];
    return m;
}

}  // namespace

TEST_CASE("Gamma posterior, no state effects: goals to come are negative binomial") {
    const ModelParams params = gamma_no_state_effects();
    PricingModel model(params);
    const TimingCurve curve(params.timing, CompetitionFormat{});
    PricingState st = pricing_state(1.6, 1.05, at_minute(Period::second_half, 57.0), 2, 0);
    st.reds = {0, 1};  // red cards scale rates but do not couple the sides
    st.theta_shape = {params.kappa + 2, params.kappa + 0};
    st.theta_rate = {params.kappa + 0.9, params.kappa + 0.55};
    Outputs out;
    model.price(st, out);
    const double tau = curve.remaining_regulation(st.clock, std::nullopt);
    const double mean_h = 1.6 * tau * params.red_cards.opponent_per_card;
    const double mean_a = 1.05 * tau * params.red_cards.own_per_card;
    const double p_h = st.theta_rate[0] / (st.theta_rate[0] + mean_h);
    const double p_a = st.theta_rate[1] / (st.theta_rate[1] + mean_a);
    // Boost.Math negative_binomial(r, p): failures before the r-th success.
    const boost::math::negative_binomial_distribution<double> nh(st.theta_shape[0], p_h),
        na(st.theta_shape[1], p_a);
    // SciPy scipy.stats.nbinom(n, p), same parametrisation.
    const auto sh = scipy_values("nbinom " + num(st.theta_shape[0]) + " " + num(p_h) + " " +
                                 std::to_string(kGrid - 1));
    const auto sa = scipy_values("nbinom " + num(st.theta_shape[1]) + " " + num(p_a) + " " +
                                 std::to_string(kGrid - 1));
    REQUIRE(sh.size() == kGrid + 1);
    REQUIRE(sa.size() == kGrid + 1);
    for (std::size_t i = 0; i < kGrid; ++i) {
        for (std::size_t j = 0; j < kGrid; ++j) {
            const double boost_cell = boost::math::pdf(nh, static_cast<double>(i)) *
                                      boost::math::pdf(na, static_cast<double>(j));
            CHECK(out.goals_added[i][j] == Approx(boost_cell).margin(1e-12));
            CHECK(out.goals_added[i][j] == Approx(sh[i] * sa[j]).margin(1e-12));
        }
    }
    // Marginals to within the grid's tail (sum of the other side beyond the grid).
    for (std::size_t k = 0; k < kGrid; ++k) {
        CHECK(marginal(out, true, k) == Approx(sh[k] * sa[kGrid]).margin(1e-12));
        CHECK(marginal(out, false, k) == Approx(sa[k] * sh[kGrid]).margin(1e-12));
    }
    CHECK(out.tail_mass == Approx(1.0 - sh[kGrid] * sa[kGrid]).margin(1e-12));
    // Mean of NB: shape (1 - p) / p (Boost.Math mean).
    CHECK(out.expected_home_goals == Approx(2 + boost::math::mean(nh)).epsilon(1e-12));
    CHECK(out.expected_away_goals == Approx(0 + boost::math::mean(na)).epsilon(1e-12));
}

TEST_CASE("prior strength before kick-off: Gamma(kappa, kappa) gives NB with mean lambda") {
    const ModelParams params = gamma_no_state_effects();
    PricingModel model(params);
    PricingState st = pricing_state(1.3, 1.3, {Period::pre_match, 0});
    st.theta_shape = {params.kappa, params.kappa};
    st.theta_rate = {params.kappa, params.kappa};
    Outputs out;
    model.price(st, out);
    const boost::math::negative_binomial_distribution<double> nb(
        params.kappa, params.kappa / (params.kappa + 1.3));
    for (std::size_t i = 0; i < kGrid; ++i) {
        CHECK(out.goals_added[i][0] ==
              Approx(boost::math::pdf(nb, static_cast<double>(i)) * boost::math::pdf(nb, 0.0))
                  .margin(1e-12));
    }
    CHECK(out.expected_home_goals == Approx(1.3).epsilon(1e-12));
    // Symmetric sides: home and away equally likely.
    CHECK(out.p_home == Approx(out.p_away).margin(1e-12));
}
