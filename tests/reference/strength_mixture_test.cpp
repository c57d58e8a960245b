// The strength mixture of the full model, checked against sources outside its own code path:
//  - the Beta(α_H, α_A) quadrature rule against SciPy's Gauss–Jacobi roots
//    (scipy.special.roots_jacobi, Debian's python3-scipy) and against the Beta moments
//    E[ρ^m] = Π_{r<m} (a + r) / (a + b + r) (the published closed form);
//  - jump-count weights against Boost.Math's Poisson and negative binomial pmfs;
//  - a score chain whose rates share a Gamma factor against the negative multinomial pmf
//    P(i, j) = Γ(A+i+j) / (Γ(A) i! j!) x^i y^j / (1+x+y)^(A+i+j) (Gamma mixture of two
//    Poisson counts; lgamma from Boost.Math);
//  - the full model (ratio rule: s integrated exactly, ρ by quadrature) against the plain
//    brute-force mixture: both strengths on 16-node Gauss–Laguerre rules, one known-rate chain
//    solve per pair of nodes (256 solves), extra time per pair.
#include <boost/math/distributions/negative_binomial.hpp>
#include <boost/math/distributions/poisson.hpp>
#include <boost/math/special_functions/gamma.hpp>
#include <catch2/catch.hpp>

#include <algorithm>
#include <array>
#include <cmath>
#include <optional>
#include <string>
#include <vector>

#include "liveprob/core/intensity.hpp"
#include "liveprob/core/jump_counts.hpp"
#include "liveprob/core/pricing.hpp"
#include "liveprob/core/quadrature.hpp"
#include "liveprob/core/score_chain.hpp"
#include "liveprob/core/shootout.hpp"
#include "liveprob/core/timing.hpp"
#include "pricing_fixtures.hpp"

using namespace liveprob;

using namespace liveprob::core;

namespace {

std::size_t at(int k) { return static_cast<std::size_t>(k); }

// What the brute-force mixture gives for the outputs compared below.
struct Reference {
    ScoreGrid grid;
    double advance_home = 0.0;
    double next_home = 0.0;
    double next_away = 0.0;
};

Reference product_reference(const ModelParams& prm, const PricingState& st) {
    const TimingCurve tc(prm.timing, st.format);
    const double now = tc.remaining_regulation(st.clock, st.announced_stoppage_minutes);
    const double extra = tc.remaining_extra_time(st.clock, std::nullopt);
    const int tie0 = st.goals[0] - st.goals[1];
    const double shootout_home = shootout_home_win_before_toss(prm.shootout);
    ClassRates base;
    for (int c = 0; c < kDiffClasses; ++c) {
        base.home[at(c)] =
            st.prior.home_goals * state_multiplier(prm, Side::home, c - 1, st.reds[0], st.reds[1]);
        base.away[at(c)] =
            st.prior.away_goals * state_multiplier(prm, Side::away, 1 - c, st.reds[1], st.reds[0]);
    }
    GammaQuadrature qh, qa;
    gamma_quadrature(st.theta_shape[0], 16, qh);
    gamma_quadrature(st.theta_shape[1], 16, qa);
    Reference ref;
    ScoreChain chain;
    ScoreGrid g;
    const auto c0 = at(diff_class(tie0));
    for (int kh = 0; kh < 16; ++kh) {
        for (int ka = 0; ka < 16; ++ka) {
            const double th = qh.node[at(kh)] / st.theta_rate[0];
            const double ta = qa.node[at(ka)] / st.theta_rate[1];
            const double wt = qh.weight[at(kh)] * qa.weight[at(ka)];
            ClassRates r;
            for (std::size_t c = 0; c < kDiffClasses; ++c) {
                r.home[c] = base.home[c] * th;
                r.away[c] = base.away[c] * ta;
            }
            chain.solve(r, tie0, now, g);
            double tie_home = 0.0, tie_level = 0.0;
            for (int i = 0; i <= kGrid; ++i) {
                for (int j = 0; j <= kGrid; ++j) {
                    if (i == kGrid && j == kGrid) continue;
                    const double v = i == kGrid   ? g.home_overflow[at(j)]
                                     : j == kGrid ? g.away_overflow[at(i)]
                                                  : g.cell[at(i)][at(j)];
                    if (i < kGrid && j < kGrid) ref.grid.cell[at(i)][at(j)] += wt * v;
                    if (i == kGrid) ref.grid.home_overflow[at(j)] += wt * v;
                    if (j == kGrid) ref.grid.away_overflow[at(i)] += wt * v;
                    const int d = tie0 + i - j;
                    if (d > 0) tie_home += v;
                    if (d == 0) tie_level += v;
                }
            }
            const DifferenceOutcome et = solve_difference(r, 0, extra);
            ref.advance_home +=
                wt * (tie_home + tie_level * (et.home_ahead + et.level * shootout_home));
            const double a = base.home[c0] * th;
            const double b = base.away[c0] * ta;
            const double any = -std::expm1(-(a + b) * now);
            ref.next_home += wt * any * a / (a + b);
            ref.next_away += wt * any * b / (a + b);
        }
    }
    return ref;
}

double largest_difference(const Outputs& out, const Reference& ref) {
    double m = std::max({std::abs(out.p_advance_home - ref.advance_home),
                         std::abs(out.next_goal_home - ref.next_home),
                         std::abs(out.next_goal_away - ref.next_away),
                         std::abs(out.tail_mass - ref.grid.overflow_total())});
    for (std::size_t i = 0; i < kGrid; ++i) {
        for (std::size_t j = 0; j < kGrid; ++j)
            m = std::max(m, std::abs(out.goals_added[i][j] - ref.grid.cell[i][j]));
    }
    return m;
}

// Knock-out states over the match: priors, minutes, scores, red cards, strength evidence.
std::vector<PricingState> knockout_states(const ModelParams& params) {
    std::vector<PricingState> states;
    for (const auto& [home, away] :
         {std::pair{0.6, 1.2}, std::pair{1.5, 1.1}, std::pair{3.0, 0.8}}) {
        for (double minute : {0.0, 30.0, 60.0, 85.0}) {
            for (const auto& [gh, ga] : {std::pair{0, 0}, std::pair{1, 0}, std::pair{0, 2}}) {
                for (int red_home : {0, 1}) {
                    const MatchClock clock =
                        minute == 0.0
                            ? MatchClock{Period::pre_match, 0}
                            : test::at_minute(
                                  minute <= 45 ? Period::first_half : Period::second_half, minute);
                    PricingState st = test::pricing_state(home, away, clock, minute == 0.0 ? 0 : gh,
                                                          minute == 0.0 ? 0 : ga);
                    st.reds = {minute == 0.0 ? 0 : red_home, 0};
                    st.format.extra_time = st.format.shootout = true;
                    const StrengthPosterior h =
                        strength_posterior(params, st.goals[0], home * minute / 95.0);
                    const StrengthPosterior a =
                        strength_posterior(params, st.goals[1], away * minute / 95.0);
                    st.theta_shape = {h.shape, a.shape};
                    st.theta_rate = {h.rate, a.rate};
                    states.push_back(st);
                }
            }
        }
    }
    return states;
}

}  // namespace

TEST_CASE("Beta quadrature nodes and weights equal SciPy's Gauss-Jacobi rule") {
    for (const auto& [a, b] : {std::pair{26.0, 25.0}, std::pair{25.5, 27.25}, std::pair{3.0, 7.0},
                               std::pair{180.0, 200.0}}) {
        for (int n : {1, 4, 6, 12}) {
            const std::vector<double> scipy =
                test::scipy_values("beta_rule " + std::to_string(a) + " " + std::to_string(b) +
                                   " " + std::to_string(n));
            REQUIRE(scipy.size() == 2 * at(n));
            QuadratureRule rule;
            beta_quadrature(a, b, n, rule);
            REQUIRE(rule.count == n);
            for (int k = 0; k < n; ++k) {
                INFO("Beta(" << a << ", " << b << ") " << n << " nodes, node " << k);
                CHECK(std::abs(rule.node[at(k)] - scipy[at(k)]) <= 1e-12);
                CHECK(std::abs(rule.weight[at(k)] - scipy[at(n + k)]) <= 1e-12);
            }
        }
    }
}

TEST_CASE("Beta quadrature reproduces the Beta moments up to degree 2n - 1") {
    for (const auto& [a, b] :
         {std::pair{26.0, 25.0}, std::pair{2.5, 0.7}, std::pair{400.0, 35.0}}) {
        for (int n : {2, 5, 8}) {
            QuadratureRule rule;
            beta_quadrature(a, b, n, rule);
            double exact = 1.0;  // E[ρ^m] = Π_{r<m} (a + r) / (a + b + r)
            for (int m = 0; m < 2 * n; ++m) {
                double rule_moment = 0.0;
                for (int k = 0; k < n; ++k)
                    rule_moment += rule.weight[at(k)] * std::pow(rule.node[at(k)], m);
                INFO("Beta(" << a << ", " << b << ") " << n << " nodes, moment " << m);
                CHECK(std::abs(rule_moment - exact) <= 1e-13 * std::max(1.0, exact));
                exact *= (a + m) / (a + b + m);
            }
        }
    }
}

TEST_CASE("jump weights equal Boost.Math's Poisson and negative binomial pmfs") {
    std::array<double, kMaxJumps> w{};
    for (double mean : {0.0, 0.3, 4.8, 60.0, 800.0}) {  // 800: P(0) underflows a double
        const std::size_t n = jump_weights(JumpCounts::poisson(mean), 1.0, w);
        const boost::math::poisson_distribution<double> pois(std::max(mean, 1e-300));
        double total = 0.0;
        for (std::size_t k = 0; k < n; ++k) {
            total += w[k];
            const double exact =
                mean == 0.0 ? (k == 0 ? 1.0 : 0.0) : boost::math::pdf(pois, static_cast<double>(k));
            INFO("Poisson(" << mean << ") at " << k);
            CHECK(std::abs(w[k] - exact) <= 1e-13 * std::max(exact, 1e-3));
        }
        CHECK(std::abs(total - 1.0) <= 1e-13);
    }
    for (const auto& [shape, scale] : {std::pair{51.0, 0.093}, std::pair{2.0, 1.5},
                                       std::pair{0.6, 3.0}, std::pair{5000.0, 0.1}}) {
        const std::size_t n = jump_weights(JumpCounts::negative_binomial(shape, scale), 1.0, w);
        const boost::math::negative_binomial_distribution<double> nb(shape, 1.0 / (1.0 + scale));
        double total = 0.0;
        for (std::size_t k = 0; k < n; ++k) {
            total += w[k];
            const double exact = boost::math::pdf(nb, static_cast<double>(k));
            INFO("NB(" << shape << ", " << scale << ") at " << k);
            CHECK(std::abs(w[k] - exact) <= 1e-12 * std::max(exact, 1e-3));
        }
        CHECK(std::abs(total - 1.0) <= 1e-13);
    }
}

TEST_CASE("a score chain with a Gamma rate factor equals the negative multinomial") {
    // No score-state effect, so the two counts are Poisson(s·x) and Poisson(s·y) given s, and
    // s ~ Gamma(A, 1) mixes them into the negative multinomial.
    ScoreChain chain;
    for (const auto& [shape, x, y] :
         {std::tuple{51.0, 1.6, 1.1}, std::tuple{8.0, 0.4, 2.2}, std::tuple{300.0, 3.0, 2.5}}) {
        ClassRates r;
        r.home.fill(x / shape);  // per unit of s, whose mean is `shape`
        r.away.fill(y / shape);
        ScoreGrid g;
        chain.add(r, 0, JumpCounts::negative_binomial(shape, r.max_total()), 1.0, g);
        double worst = 0.0;
        for (int i = 0; i < kGrid; ++i) {
            for (int j = 0; j < kGrid; ++j) {
                const double u = x / shape, v = y / shape;
                const double log_p = boost::math::lgamma(shape + i + j) -
                                     boost::math::lgamma(shape) - boost::math::lgamma(i + 1.0) -
                                     boost::math::lgamma(j + 1.0) + i * std::log(u) +
                                     j * std::log(v) - (shape + i + j) * std::log1p(u + v);
                worst = std::max(worst, std::abs(g.cell[at(i)][at(j)] - std::exp(log_p)));
            }
        }
        INFO("shape " << shape << " means " << x << ", " << y << ": largest difference " << worst);
        CHECK(worst <= 1e-13);
    }
}

TEST_CASE("full model: the ratio rule agrees with the brute-force product of 16-node rules") {
    // Node count against accuracy (engine/README.md documents this table); κ = 11.25 is the
    // value fit-inplay fits on the open data.
    for (double kappa : {25.0, 11.25, 6.0}) {
        ModelParams params;
        params.kappa = kappa;
        const std::vector<PricingState> states = knockout_states(params);
        std::vector<Reference> refs;
        for (const PricingState& st : states) refs.push_back(product_reference(params, st));
        for (int nodes : {3, 4, 5, 6, 8}) {
            params.quadrature_nodes = nodes;
            PricingModel model(params);
            double worst = 0.0;
            for (std::size_t s = 0; s < states.size(); ++s) {
                Outputs out;
                model.price(states[s], out);
                worst = std::max(worst, largest_difference(out, refs[s]));
            }
            WARN("kappa " << kappa << ", " << nodes << " ratio nodes: largest difference "
                          << worst);
            // Bounds about 5x the errors measured when this test was written.
            if (kappa == 25.0 && nodes == 5) CHECK(worst <= 1e-8);
            if (kappa == 25.0 && nodes == 6) CHECK(worst <= 2.5e-10);
            if (kappa == 25.0 && nodes == 8) CHECK(worst <= 1e-13);
            if (kappa == 11.25 && nodes == 5) CHECK(worst <= 3e-7);
            if (kappa == 11.25 && nodes == 6) CHECK(worst <= 1.5e-8);
            if (kappa == 6.0 && nodes == 6) CHECK(worst <= 3e-7);
            if (kappa == 6.0 && nodes == 8) CHECK(worst <= 1.5e-9);
        }
    }
}
