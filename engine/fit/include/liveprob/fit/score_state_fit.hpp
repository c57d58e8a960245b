// The score-state multipliers (leading / level / trailing) and the strength dispersion κ,
// fitted jointly by maximum likelihood under the engine's own model (intensity.hpp):
//
//   side X scores at λ_X · θ_X · r(t) · m_X(state),   θ_X ~ Gamma(κ, κ) independently per side,
//
// with λ_X the pre-match prior and r the goal-timing profile. Given θ, a side's goals over a
// match are a Poisson process whose likelihood depends on the data only through the goals g_s
// and the exposure e_s it had in each state s; integrating θ out gives, per side,
//
//   L = Π_s (λ m_s e_s)^{g_s} / g_s!  ·  κ^κ Γ(κ + G) / (Γ(κ) (κ + μ)^{κ + G}),
//   G = Σ_s g_s,  μ = λ Σ_s m_s e_s,
//
// (negative binomial in the total, multinomial across states). κ = ∞ is the Poisson model: a
// Poisson GLM with log link, offsets log(λ e_s) and one coefficient per state. A match listed
// only because it had a goal (InplayMatch::listed_for_goals) is conditioned on at least one
// regulation goal: its likelihood is divided by 1 − P(0–0), where the state is level all match.
//
// The state effects are fitted on the log scale, κ as log κ; Newton with the analytic gradient
// and the Hessian by differences of it; standard errors from the observed information, carried
// to the natural scale by the delta method.
#pragma once

#include <span>

#include "liveprob/core/params.hpp"
#include "liveprob/fit/inplay_sample.hpp"

namespace liveprob::fit {

struct ScoreStateFitOptions {
    bool fit_dispersion = true;  // false: κ = ∞ (plain Poisson)
    // One multiplier for all three states (the state effects switched off): then only the
    // side totals matter, and with dispersion the fit is a negative-binomial regression with an
    // intercept and offsets log(λ·exposure).
    bool common_multiplier = false;
    bool condition_on_listing = true;  // honour RegulationRecord::listed_for_goals
    // κ beyond this counts as no dispersion found: the fit falls back to κ = ∞.
    double max_kappa = 1e5;
};

struct ScoreStateFit {
    core::ScoreStateEffects effects;  // level included: it absorbs any overall scale of the priors
    double kappa = 0.0;               // +inf when not fitted or when the data show no dispersion
    double leading_se = 0, level_se = 0, trailing_se = 0, kappa_se = 0;
    double log_likelihood = 0.0;
    int sides = 0, goals = 0, listed_for_goals = 0;
    int iterations = 0;
    bool converged = false;
    bool dispersion_at_bound = false;  // κ ran past max_kappa: reported as ∞
};

// Throws std::invalid_argument when no record carries exposure.
[[nodiscard]] ScoreStateFit fit_score_state(std::span<const RegulationRecord> records,
                                            const ScoreStateFitOptions& options = {});

// The log-likelihood above (with the listing condition when asked) at given values: for
// checks and profile plots.
[[nodiscard]] double score_state_log_likelihood(std::span<const RegulationRecord> records,
                                                const core::ScoreStateEffects& effects,
                                                double kappa, bool condition_on_listing = true);

}  // namespace liveprob::fit
