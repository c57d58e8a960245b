// What the two timeline readers share: the completeness check and the split into regulation and
// extra time, applied to a match whose goals the reader has already collected.
#pragma once

#include <array>
#include <optional>

#include "liveprob/datasets/match_timelines.hpp"

namespace liveprob::datasets::detail {

enum class TimelineVerdict { usable, goals_incomplete, aggregate_tie };

// `final_goals`: the source's final score (after extra time when it was played).
// `extra_time_reported`: the source says extra time was played (it is also inferred from
// extra-time goals and from a shoot-out). Sorts the goals, fills the goal counts and the
// extra-time flag.
TimelineVerdict finish_timeline(MatchTimeline& match, std::array<int, 2> final_goals,
                                bool extra_time_reported);

// Counts a match left out for `verdict` (nothing when usable).
void count_skip(TimelinesRead& read, int day, TimelineVerdict verdict);

}  // namespace liveprob::datasets::detail
