// The extra-time rate factor (TimingProfile::extra_time_factor), fitted by maximum likelihood on
// the time to the first extra-time goal of matches level after regulation.
//
// In the engine, side X scores in extra time at f · λ_X · θ_X · r_ET(t) · m_level while the tie
// is level, r_ET being the extra-time rate at f = 1, and θ_X carries its posterior from
// regulation, Gamma(κ + g_X, κ + E_X) (intensity.hpp). With c_X = λ_X m_level, the exposure τ
// (at f = 1) from the start of extra time to its first goal, and a_X, b_X that posterior's shape
// and rate, a match contributes
//
//   no goal in extra time (τ = all of it):  Π_X (b_X / (b_X + f c_X τ))^{a_X}
//   first goal by X after τ:                f c_X a_X / (b_X + f c_X τ) · Π_Y (b_Y / (b_Y + f c_Y
//   τ))^{a_Y}
//
// (with κ = ∞ each factor is the Poisson one, exp(−f c_X τ), and f̂ = goals / Σ (c_H + c_A) τ in
// closed form). Only the first goal is used, so the estimate holds whether or not the
// competition ended extra time at its first goal. Fitted as log f by Newton; the standard error
// from the observed information, by the delta method.
#pragma once

#include <span>

#include "liveprob/core/params.hpp"
#include "liveprob/fit/inplay_sample.hpp"

namespace liveprob::fit {

struct ExtraTimeFit {
    double factor = 0.0;
    double factor_se = 0.0;
    double log_likelihood = 0.0;
    int matches = 0;
    int first_goals = 0;                // matches whose extra time had a goal
    double expected_first_goals = 0.0;  // at the fitted factor, under the same model
    int iterations = 0;
    bool converged = false;
};

// `effects` and `kappa` are the regulation model's (the fitted score-state effects and κ).
// Throws std::invalid_argument when there is no record.
[[nodiscard]] ExtraTimeFit fit_extra_time_factor(std::span<const ExtraTimeRecord> records,
                                                 const core::ScoreStateEffects& effects,
                                                 double kappa);

}  // namespace liveprob::fit
