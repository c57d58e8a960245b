// State-dependent scoring intensity: the multiplier m_X(state) on a side's rate, and the
// Bayesian strength posterior θ_X ~ Gamma(shape, rate) that the match state carries.
#pragma once

#include <optional>

#include "liveprob/core/messages.hpp"
#include "liveprob/core/params.hpp"

namespace liveprob::core {

// m_X: the score-state effect (leading / level / trailing by `goal_diff_for_side`, the side's
// own goals minus its opponent's; for the second leg of a tie pass the aggregate difference)
// times the red-card effects, each per card and capped at `max_cards` per side.
double state_multiplier(const ModelParams& params, Side side, int goal_diff_for_side, int own_reds,
                        int opp_reds);

// Gamma posterior of a side's strength θ (mean shape / rate). shape = +inf means θ = 1 exactly.
struct StrengthPosterior {
    double shape = 0.0;
    double rate = 0.0;
};

// Before kick-off: Gamma(κ, κ) (θ = 1 exactly when κ = ∞).
StrengthPosterior strength_prior(const ModelParams& params);

// After `goals` by the side over `expected_so_far` = λ_X · ∫ r(t) m_X(state(t)) dt, the
// expected goals so far under the prior and the states actually passed through. When the
// match carries xG evidence, `xg_so_far` (the side's summed shot xG) counts `xg_weight` of a
// goal per unit and adds the same weight of exposure: Gamma(κ + g + w·xG, κ + E + w·E).
StrengthPosterior strength_posterior(const ModelParams& params, double goals,
                                     double expected_so_far,
                                     std::optional<double> xg_so_far = std::nullopt);

}  // namespace liveprob::core
