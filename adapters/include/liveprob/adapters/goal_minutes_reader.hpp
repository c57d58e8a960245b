// Goal minutes from the open international data for the timing-profile fit: goals per minute
// 1..90 over the matches whose goal records add up to their final score and lie in regulation
// (minutes 1..90). Other matches are counted as skipped, never half-used.
#pragma once

#include <string>

#include "liveprob/engine/fit/goal_timing.hpp"

namespace liveprob {

struct GoalMinutesRead {
    fit::MinuteCounts counts{};
    int matches_used = 0;
    int matches_skipped = 0;  // goal records incomplete, or a goal outside 1..90
};

GoalMinutesRead read_regulation_goal_minutes(const std::string& results_csv, const std::string& goalscorers_csv);

}  // namespace liveprob
