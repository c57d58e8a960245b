#include "liveprob/fit/score_state_fit.hpp"

#include <cmath>
#include <limits>
#include <stdexcept>

#include "log_factorial.hpp"
#include "small_newton.hpp"

namespace liveprob::fit {
namespace {

constexpr auto kLevel = static_cast<std::size_t>(ScoreState::level);

// Which parameters are free: log multipliers (one shared, or one per state), then log κ.
struct Layout {
    bool common = false;
    bool dispersion = true;
    Eigen::Index size() const { return (common ? 1 : kScoreStates) + (dispersion ? 1 : 0); }
    Eigen::Index beta(std::size_t state) const {
        return common ? 0 : static_cast<Eigen::Index>(state);
    }
    Eigen::Index log_kappa() const { return common ? 1 : kScoreStates; }
};

struct Values {
    std::array<double, kScoreStates> m{};
    double kappa = std::numeric_limits<double>::infinity();
};

Values values_at(const Layout& layout, const Eigen::VectorXd& x) {
    Values v;
    for (std::size_t s = 0; s < kScoreStates; ++s) v.m[s] = std::exp(x[layout.beta(s)]);
    if (layout.dispersion) v.kappa = std::exp(x[layout.log_kappa()]);
    return v;
}

struct Evaluation {
    double value = 0.0;
    Eigen::VectorXd gradient;
};

// One side's term: Σ_s g_s log(λ m_s e_s) − log g_s! plus the Poisson or negative-binomial
// total; its gradient in (log m, log κ).
void add_side(const SideStates& side, const Layout& layout, const Values& v, Evaluation& e) {
    const bool poisson = !layout.dispersion;
    double mu = 0.0;
    std::array<double, kScoreStates> c{};
    for (std::size_t s = 0; s < kScoreStates; ++s) {
        c[s] = side.prior * v.m[s] * side.exposure[s];
        mu += c[s];
        if (side.goals[s] > 0)
            e.value += side.goals[s] * std::log(c[s]) - log_factorial(side.goals[s]);
    }
    const int goals = side.total_goals();
    if (poisson) {
        e.value -= mu;
        for (std::size_t s = 0; s < kScoreStates; ++s)
            e.gradient[layout.beta(s)] += side.goals[s] - c[s];
        return;
    }
    const double k = v.kappa;
    double log_rising = 0.0, digamma_step = 0.0;  // log Γ(κ+G)/Γ(κ) and ψ(κ+G) − ψ(κ)
    for (int j = 0; j < goals; ++j) {
        log_rising += std::log(k + j);
        digamma_step += 1.0 / (k + j);
    }
    e.value += log_rising - k * std::log1p(mu / k) - goals * std::log(k + mu);
    const double w = (k + goals) / (k + mu);
    for (std::size_t s = 0; s < kScoreStates; ++s)
        e.gradient[layout.beta(s)] += side.goals[s] - w * c[s];
    const double d_kappa = -std::log1p(mu / k) + 1.0 - w + digamma_step;
    e.gradient[layout.log_kappa()] += k * d_kappa;
}

// −log(1 − P(no regulation goal)): level all match, each side's whole exposure at m_level.
void add_listing_condition(const RegulationRecord& r, const Layout& layout, const Values& v,
                           Evaluation& e) {
    double log_p0 = 0.0, d_beta = 0.0, d_log_kappa = 0.0;
    for (const SideStates& side : r.sides) {
        const double a = side.prior * v.m[kLevel] * side.total_exposure();
        if (!layout.dispersion) {
            log_p0 -= a;
            d_beta -= a;
            continue;
        }
        const double k = v.kappa;
        log_p0 -= k * std::log1p(a / k);
        d_beta -= k * a / (k + a);
        d_log_kappa += k * (-std::log1p(a / k) + a / (k + a));
    }
    e.value -= std::log(-std::expm1(log_p0));
    const double ratio = 1.0 / std::expm1(-log_p0);  // P0 / (1 − P0)
    e.gradient[layout.beta(kLevel)] += ratio * d_beta;
    if (layout.dispersion) e.gradient[layout.log_kappa()] += ratio * d_log_kappa;
}

Evaluation evaluate(std::span<const RegulationRecord> records, const Layout& layout,
                    const Eigen::VectorXd& x, bool condition) {
    const Values v = values_at(layout, x);
    Evaluation e;
    e.gradient = Eigen::VectorXd::Zero(layout.size());
    for (const RegulationRecord& r : records) {
        for (const SideStates& side : r.sides) add_side(side, layout, v, e);
        if (condition && r.listed_for_goals) add_listing_condition(r, layout, v, e);
    }
    if (!std::isfinite(e.value)) e.value = -std::numeric_limits<double>::infinity();
    return e;
}

ScoreStateFit run(std::span<const RegulationRecord> records, const Layout& layout,
                  const ScoreStateFitOptions& o) {
    detail::SmallProblem problem;
    problem.value = [&](const Eigen::VectorXd& x) {
        return evaluate(records, layout, x, o.condition_on_listing).value;
    };
    problem.gradient = [&](const Eigen::VectorXd& x) {
        return evaluate(records, layout, x, o.condition_on_listing).gradient;
    };
    Eigen::VectorXd start = Eigen::VectorXd::Zero(layout.size());
    if (layout.dispersion) start[layout.log_kappa()] = std::log(10.0);
    const detail::SmallFit fit = detail::maximise(problem, start);

    ScoreStateFit out;
    const Values v = values_at(layout, fit.x);
    out.effects = {v.m[0], v.m[1], v.m[2]};
    out.kappa = v.kappa;
    auto se = [&](Eigen::Index i, double value) {
        return value * std::sqrt(std::max(fit.covariance(i, i), 0.0));
    };
    out.leading_se = se(layout.beta(0), v.m[0]);
    out.level_se = se(layout.beta(1), v.m[1]);
    out.trailing_se = se(layout.beta(2), v.m[2]);
    if (layout.dispersion) out.kappa_se = se(layout.log_kappa(), v.kappa);
    out.log_likelihood = fit.log_likelihood;
    out.iterations = fit.iterations;
    out.converged = fit.converged;
    return out;
}

}  // namespace

double score_state_log_likelihood(std::span<const RegulationRecord> records,
                                  const core::ScoreStateEffects& effects, double kappa,
                                  bool condition_on_listing) {
    Layout layout;
    layout.dispersion = std::isfinite(kappa);
    Eigen::VectorXd x(layout.size());
    x << std::log(effects.leading), std::log(effects.level), std::log(effects.trailing);
    if (layout.dispersion) x[layout.log_kappa()] = std::log(kappa);
    return evaluate(records, layout, x, condition_on_listing).value;
}

ScoreStateFit fit_score_state(std::span<const RegulationRecord> records,
                              const ScoreStateFitOptions& o) {
    int sides = 0, goals = 0, listed = 0;
    for (const RegulationRecord& r : records) {
        for (const SideStates& s : r.sides)
            if (s.prior > 0.0 && s.total_exposure() > 0.0) {
                ++sides;
                goals += s.total_goals();
            }
        listed += r.listed_for_goals ? 1 : 0;
    }
    if (sides == 0)
        throw std::invalid_argument(
            "no match with a prior and exposure to fit the score-state effects on");

    Layout layout;
    layout.common = o.common_multiplier;
    layout.dispersion = o.fit_dispersion;
    ScoreStateFit out = run(records, layout, o);
    if (layout.dispersion && !(out.kappa <= o.max_kappa)) {  // no dispersion found: Poisson
        layout.dispersion = false;
        out = run(records, layout, o);
        out.dispersion_at_bound = true;
    }
    out.sides = sides;
    out.goals = goals;
    out.listed_for_goals = o.condition_on_listing ? listed : 0;
    return out;
}

}  // namespace liveprob::fit
