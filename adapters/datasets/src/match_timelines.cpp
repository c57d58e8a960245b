#include <algorithm>

#include "timeline_checks.hpp"

namespace liveprob::datasets::detail {

TimelineVerdict finish_timeline(MatchTimeline& match, std::array<int, 2> final_goals,
                                bool extra_time_reported) {
    std::stable_sort(
        match.goals.begin(), match.goals.end(), [](const TimelineGoal& a, const TimelineGoal& b) {
            return a.minute != b.minute ? a.minute < b.minute : a.stoppage < b.stoppage;
        });
    match.regulation_goals = {0, 0};
    match.extra_time_goals = {0, 0};
    for (const TimelineGoal& g : match.goals) {
        if (g.minute < 1) return TimelineVerdict::goals_incomplete;
        auto& count = g.extra_time() ? match.extra_time_goals : match.regulation_goals;
        ++count[static_cast<std::size_t>(index(g.side))];
    }
    for (std::size_t s = 0; s < 2; ++s) {
        if (match.regulation_goals[s] + match.extra_time_goals[s] != final_goals[s])
            return TimelineVerdict::goals_incomplete;
    }
    const bool extra_goals = match.extra_time_goals[0] + match.extra_time_goals[1] > 0;
    match.extra_time = extra_time_reported || extra_goals || match.shootout.has_value();
    if (match.extra_time && match.regulation_goals[0] != match.regulation_goals[1])
        return TimelineVerdict::aggregate_tie;
    if (match.shootout && final_goals[0] != final_goals[1]) return TimelineVerdict::aggregate_tie;
    return TimelineVerdict::usable;
}

void count_skip(TimelineSkips& skips, TimelineVerdict verdict) noexcept {
    switch (verdict) {
        case TimelineVerdict::goals_incomplete: ++skips.goals_incomplete; break;
        case TimelineVerdict::aggregate_tie: ++skips.aggregate_tie; break;
        case TimelineVerdict::usable: break;
    }
}

}  // namespace liveprob::datasets::detail
