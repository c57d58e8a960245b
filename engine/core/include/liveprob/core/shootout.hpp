// Penalty shoot-out, solved exactly: best of five kicks each in ABAB order, ending early once
// a side cannot catch up, then sudden-death rounds. Kicks are independent with a per-kick
// conversion (plus an optional edge for the side kicking first).
#pragma once

#include "liveprob/core/params.hpp"
#include "liveprob/core/pricing.hpp"

namespace liveprob::core {

inline constexpr int kShootoutRegularKicks = 5;

enum class ShootoutOutcome { undecided, first_wins, second_wins };

// Whether the kicks so far already decide it (by the kicking side's count, `first` and
// `second` being the sides in kicking order).
[[nodiscard]] ShootoutOutcome shootout_outcome(int first_taken, int first_scored, int second_taken,
                                               int second_scored);

// P(home wins the shoot-out) from any reachable partial state, kick by kick. Throws
// std::invalid_argument for a state the ABAB order cannot produce or conversions outside (0,1).
[[nodiscard]] double shootout_home_win(const ShootoutParams& params, const ShootoutState& state);

// Before the shoot-out starts: the side kicking first is decided by a coin toss (1/2 each).
[[nodiscard]] double shootout_home_win_before_toss(const ShootoutParams& params);

}  // namespace liveprob::core
