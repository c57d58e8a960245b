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

void count_skip(TimelinesRead& read, int day, TimelineVerdict verdict) {
    switch (verdict) {
        case TimelineVerdict::goals_incomplete:
            read.leave_out(day, SkipReason::goals_incomplete);
            break;
        case TimelineVerdict::aggregate_tie: read.leave_out(day, SkipReason::aggregate_tie); break;
        case TimelineVerdict::usable: break;
    }
}

}  // namespace liveprob::datasets::detail

namespace liveprob::datasets {
namespace {

void count(TimelineSkips& skips, SkipReason reason) noexcept {
    switch (reason) {
        case SkipReason::no_result: ++skips.no_result; break;
        case SkipReason::unreadable: ++skips.unreadable; break;
        case SkipReason::duplicate: ++skips.duplicates; break;
        case SkipReason::goals_incomplete: ++skips.goals_incomplete; break;
        case SkipReason::not_covered: ++skips.not_covered; break;
        case SkipReason::aggregate_tie: ++skips.aggregate_tie; break;
    }
}

bool within(int day, std::optional<int> from, std::optional<int> to) noexcept {
    return (!from || day >= *from) && (!to || day < *to);
}

}  // namespace

void TimelinesRead::leave_out(std::optional<int> day, SkipReason reason) {
    count(skipped, reason);
    left_out.push_back({day, reason});
}

TimelineSkips TimelinesRead::skips_between(std::optional<int> from, std::optional<int> to) const {
    TimelineSkips out;
    for (const auto& m : left_out)
        if (!m.day || within(*m.day, from, to)) count(out, m.reason);
    return out;
}

std::size_t TimelinesRead::taken_between(std::optional<int> from, std::optional<int> to) const {
    return static_cast<std::size_t>(std::count_if(
        matches.begin(), matches.end(), [&](const auto& m) { return within(m.day, from, to); }));
}

}  // namespace liveprob::datasets
