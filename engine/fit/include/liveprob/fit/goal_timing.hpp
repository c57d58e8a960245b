// The goal-timing profile r(t) fitted to goal minutes. The data give goals per match minute
// 1..90, stoppage-time goals counted in minute 45 or 90. The profile (TimingProfile) is linear
// within each half, and minute 45 (90) also holds the expected first-half (second-half)
// stoppage at `stoppage_factor` times the half's end rate. Conditional on the number of goals
// the minute counts are multinomial; the fit maximises that likelihood (Newton on logs of
// first_half_start, second_half_start, second_half_end, stoppage_factor, with first_half_end
// fixed at 1 since only the shape matters; stoppage durations are held at their given values
// because only factor × duration is identified).
#pragma once

#include <array>

#include "liveprob/core/params.hpp"

namespace liveprob::fit {

using MinuteCounts = std::array<double, 90>;  // [m − 1] = goals recorded in minute m

struct TimingFit {
    core::TimingProfile profile;
    double first_half_start_se = 0, second_half_start_se = 0, second_half_end_se = 0,
           stoppage_factor_se = 0;
    double second_half_share = 0;     // of regulation goals, by the fitted profile
    double second_half_share_se = 0;  // delta method
    double data_second_half_share = 0;
    double goals = 0;
    double log_likelihood = 0;
    int iterations = 0;
    bool converged = false;
};

// Expected share of regulation goals in each minute bucket under `profile`.
[[nodiscard]] MinuteCounts minute_shares(const core::TimingProfile& profile);

// Throws std::invalid_argument when there are no goals.
[[nodiscard]] TimingFit fit_goal_timing(const MinuteCounts& counts,
                                        const core::TimingProfile& start);

// The stoppage factor from a source that tells stoppage-time goals apart (45+k, 90+k, k ≥ 1).
// With the profile's shape and its expected stoppage held, the regulation goals are multinomial
// over the minutes and the two stoppages, whose cells scale with the factor alone; the share of
// stoppage goals S / N is then sufficient and the maximum is in closed form:
//   f̂ = S / (N − S) · A / B,   A = the 90 minutes' rates, B = D₁·r(45) + D₂·r(90)
// (rates as in minute_shares, D the expected stoppage). Standard error from the binomial
// variance of S / N by the delta method.
struct StoppageFit {
    double factor = 0.0;
    double factor_se = 0.0;
    int regulation_goals = 0;
    int stoppage_goals = 0;
};
// Throws std::invalid_argument unless 0 < stoppage_goals < regulation_goals.
[[nodiscard]] StoppageFit fit_stoppage_factor(int regulation_goals, int stoppage_goals,
                                              const core::TimingProfile& shape);

}  // namespace liveprob::fit
