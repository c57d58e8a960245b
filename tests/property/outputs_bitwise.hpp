// Two pricings compared to the last bit: the same state and clock must give the very same
// figures, whatever order or path (re-fold from the start or from a checkpoint) led there.
#pragma once

#include "liveprob/core/outputs.hpp"

namespace liveprob::test {

inline bool bitwise_same(const core::Outputs& a, const core::Outputs& b) {
    return a.status == b.status && a.clock == b.clock && a.home_goals == b.home_goals &&
           a.away_goals == b.away_goals && a.home_reds == b.home_reds &&
           a.away_reds == b.away_reds && a.p_home == b.p_home && a.p_draw == b.p_draw &&
           a.p_away == b.p_away && a.has_advance == b.has_advance &&
           a.p_advance_home == b.p_advance_home && a.p_advance_away == b.p_advance_away &&
           a.expected_home_goals == b.expected_home_goals &&
           a.expected_away_goals == b.expected_away_goals && a.next_goal_home == b.next_goal_home &&
           a.next_goal_away == b.next_goal_away && a.next_goal_none == b.next_goal_none &&
           a.p_over == b.p_over && a.p_both_score == b.p_both_score &&
           a.goals_added == b.goals_added && a.tail_mass == b.tail_mass &&
           a.events_applied == b.events_applied;
}

}  // namespace liveprob::test
