// Documented accuracy of the strength mixture (engine/README.md): Gauss–Laguerre quadrature
// of Poisson goal counts over θ ~ Gamma(shape, rate) against the exact negative binomial of
// Boost.Math (boost/math/distributions/negative_binomial.hpp), and the full model with the
// default node count against 16 nodes.
#include <boost/math/distributions/negative_binomial.hpp>
#include <boost/math/distributions/poisson.hpp>
#include <catch2/catch.hpp>

#include <algorithm>
#include <cmath>

#include "liveprob/core/intensity.hpp"
#include "liveprob/core/pricing.hpp"
#include "liveprob/core/quadrature.hpp"
#include "pricing_fixtures.hpp"

using namespace liveprob;

using namespace liveprob::core;

namespace {

// Largest error over goal counts 0..40 of the n-node mixture of Poisson(θ · mean).
double mixture_error(double shape, double rate, double mean, int nodes) {
    GammaQuadrature q;
    gamma_quadrature(shape, nodes, q);
    const boost::math::negative_binomial_distribution<double> exact(shape, rate / (rate + mean));
    double worst = 0.0;
    for (int k = 0; k <= 40; ++k) {
        double mix = 0.0;
        for (int i = 0; i < q.count; ++i) {
            const boost::math::poisson_distribution<double> pois(
                q.node[static_cast<std::size_t>(i)] / rate * mean);
            mix += q.weight[static_cast<std::size_t>(i)] * boost::math::pdf(pois, k);
        }
        worst = std::max(worst, std::abs(mix - boost::math::pdf(exact, k)));
    }
    return worst;
}

double largest_difference(const Outputs& a, const Outputs& b) {
    double m = std::max({std::abs(a.p_home - b.p_home), std::abs(a.p_draw - b.p_draw),
                         std::abs(a.p_advance_home - b.p_advance_home),
                         std::abs(a.next_goal_home - b.next_goal_home)});
    for (std::size_t i = 0; i < kGrid; ++i) {
        for (std::size_t j = 0; j < kGrid; ++j)
            m = std::max(m, std::abs(a.goals_added[i][j] - b.goals_added[i][j]));
    }
    for (std::size_t k = 0; k < kTotalsLines; ++k)
        m = std::max(m, std::abs(a.p_over[k] - b.p_over[k]));
    return m;
}

}  // namespace

TEST_CASE("6-node quadrature of Poisson counts against the exact negative binomial") {
    // Whole-match means 0.5 .. 3.5 goals; prior and after some play (shape and rate grown).
    struct Bound {
        double kappa;
        double bound;
    };
    for (const Bound b : {Bound{10.0, 5e-6}, Bound{25.0, 5e-8}, Bound{50.0, 1e-9}}) {
        double worst = 0.0;
        for (double mean : {0.5, 1.5, 2.5, 3.5}) {
            worst = std::max(worst, mixture_error(b.kappa, b.kappa, mean, 6));
            worst = std::max(worst, mixture_error(b.kappa + 2, b.kappa + 1.1, mean * 0.4, 6));
        }
        INFO("kappa " << b.kappa << " largest error " << worst);
        CHECK(worst <= b.bound);
    }
}

TEST_CASE("16-node quadrature is converged: the reference for the full model below") {
    double worst = 0.0;
    for (double mean : {0.5, 1.5, 2.5, 3.5})
        worst = std::max(worst, mixture_error(25.0, 25.0, mean, 16));
    INFO("largest error " << worst);
    CHECK(worst <= 1e-13);
}

namespace {

// Largest difference of any output between the default node count and 16 nodes, full model.
double full_model_error(double kappa) {
    ModelParams params;  // default node count
    params.kappa = kappa;
    ModelParams reference = params;
    reference.quadrature_nodes = 16;
    PricingModel model(params), fine(reference);
    double worst = 0.0;
    for (double home : {0.6, 1.5, 3.0}) {
        for (double minute : {0.0, 30.0, 60.0, 85.0}) {
            for (int goals = 0; goals < 3; ++goals) {
                const MatchClock clock =
                    minute == 0.0
                        ? MatchClock{Period::pre_match, 0}
                        : test::at_minute(minute <= 45 ? Period::first_half : Period::second_half,
                                          minute);
                PricingState st = test::pricing_state(home, 1.2, clock, goals, 1);
                st.format.extra_time = st.format.shootout = true;
                const StrengthPosterior h = strength_posterior(params, goals, home * minute / 95.0);
                const StrengthPosterior a = strength_posterior(params, 1, 1.2 * minute / 95.0);
                st.theta_shape = {h.shape, a.shape};
                st.theta_rate = {h.rate, a.rate};
                Outputs x, y;
                model.price(st, x);
                fine.price(st, y);
                worst = std::max(worst, largest_difference(x, y));
            }
        }
    }
    return worst;
}

}  // namespace

TEST_CASE("full model with the default nodes against 16 nodes") {
    // At the fitted default κ (more spread, so a harder integrand) and at κ = 25.
    const double at_default = full_model_error(ModelParams{}.kappa);
    const double at_25 = full_model_error(25.0);
    INFO("largest difference " << at_default << " at the default kappa, " << at_25
                               << " at kappa 25");
    CHECK(at_default <= 1e-6);
    CHECK(at_25 <= 1e-8);
}
