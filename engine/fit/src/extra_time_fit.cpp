#include "liveprob/fit/extra_time_fit.hpp"

#include <cmath>
#include <limits>
#include <stdexcept>

#include "small_newton.hpp"

namespace liveprob::fit {
namespace {

// One side at the start of extra time: its level-state base rate c = λ m_level and its strength
// posterior Gamma(a, b) (a = b = ∞ when κ = ∞).
struct SideAtExtraTime {
    double c = 0.0, a = 0.0, b = 0.0;
};

std::array<SideAtExtraTime, 2> sides_at_extra_time(const ExtraTimeRecord& r,
                                                   const core::ScoreStateEffects& m, double kappa) {
    const std::array<double, kScoreStates> mult{m.leading, m.level, m.trailing};
    std::array<SideAtExtraTime, 2> out{};
    for (std::size_t x = 0; x < 2; ++x) {
        const SideStates& s = r.regulation.sides[x];
        double expected = 0.0;
        for (std::size_t k = 0; k < kScoreStates; ++k)
            expected += s.prior * mult[k] * s.exposure[k];
        out[x].c = s.prior * m.level;
        out[x].a = kappa + s.total_goals();
        out[x].b = kappa + expected;
    }
    return out;
}

// log P(no goal by the side over exposure τ at factor f), and its derivative in log f.
struct Survival {
    double log_value = 0.0, slope = 0.0;
};

Survival survival(const SideAtExtraTime& s, double f, double tau) {
    const double load = f * s.c * tau;
    if (std::isinf(s.a)) return {-load, -load};
    return {-s.a * std::log1p(load / s.b), -s.a * load / (s.b + load)};
}

struct Evaluation {
    double value = 0.0, slope = 0.0;
};

Evaluation evaluate(std::span<const ExtraTimeRecord> records,
                    const std::vector<std::array<SideAtExtraTime, 2>>& sides, double log_f) {
    const double f = std::exp(log_f);
    Evaluation e;
    for (std::size_t i = 0; i < records.size(); ++i) {
        const ExtraTimeRecord& r = records[i];
        const double tau = r.exposure_to_first_goal;
        for (const SideAtExtraTime& s : sides[i]) {
            const Survival sv = survival(s, f, tau);
            e.value += sv.log_value;
            e.slope += sv.slope;
        }
        if (!r.first_scorer) continue;
        const SideAtExtraTime& s = sides[i][static_cast<std::size_t>(index(*r.first_scorer))];
        if (std::isinf(s.a)) {  // hazard f c
            e.value += log_f + std::log(s.c);
            e.slope += 1.0;
        } else {  // hazard f c a / (b + f c τ)
            const double load = f * s.c * tau;
            e.value += log_f + std::log(s.c * s.a) - std::log(s.b + load);
            e.slope += s.b / (s.b + load);
        }
    }
    return e;
}

}  // namespace

ExtraTimeFit fit_extra_time_factor(std::span<const ExtraTimeRecord> records,
                                   const core::ScoreStateEffects& effects, double kappa) {
    if (records.empty())
        throw std::invalid_argument("no match with extra time to fit its rate factor on");
    std::vector<std::array<SideAtExtraTime, 2>> sides;
    sides.reserve(records.size());
    ExtraTimeFit out;
    for (const ExtraTimeRecord& r : records) {
        sides.push_back(sides_at_extra_time(r, effects, kappa));
        out.first_goals += r.first_scorer ? 1 : 0;
    }
    out.matches = static_cast<int>(records.size());
    detail::SmallProblem problem;
    problem.value = [&](const Eigen::VectorXd& x) { return evaluate(records, sides, x[0]).value; };
    problem.gradient = [&](const Eigen::VectorXd& x) {
        return Eigen::VectorXd::Constant(1, evaluate(records, sides, x[0]).slope);
    };
    const detail::SmallFit fit = detail::maximise(problem, Eigen::VectorXd::Zero(1));
    out.factor = std::exp(fit.x[0]);
    out.factor_se = out.factor * std::sqrt(std::max(fit.covariance(0, 0), 0.0));
    out.log_likelihood = fit.log_likelihood;
    out.iterations = fit.iterations;
    out.converged = fit.converged;
    for (std::size_t i = 0; i < records.size(); ++i) {
        double log_none = 0.0;
        for (const SideAtExtraTime& s : sides[i])
            log_none += survival(s, out.factor, records[i].extra_time_exposure).log_value;
        out.expected_first_goals += -std::expm1(log_none);
    }
    return out;
}

}  // namespace liveprob::fit
