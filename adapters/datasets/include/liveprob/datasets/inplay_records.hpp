// The open datasets' matches (match_timelines.hpp) as the in-play fits read them
// (engine/fit/inplay_sample.hpp, goal_timing.hpp, shootout_fit.hpp).
#pragma once

#include <span>
#include <vector>

#include "liveprob/datasets/match_timelines.hpp"
#include "liveprob/fit/goal_timing.hpp"
#include "liveprob/fit/inplay_sample.hpp"
#include "liveprob/fit/shootout_fit.hpp"

namespace liveprob::datasets {

// Both sources put a stoppage-time goal in its period's last minute (45, 90, 105, 120), the
// championship files adding how far in: the fits use the minute (the order is kept).
fit::InplayMatch inplay_match(const MatchTimeline& match, const core::PriorMeans& prior,
                              bool listed_for_goals);

// Regulation goals (minutes 1..90) per minute, over the given matches. Stoppage goals count in
// the minute the source records them in (the international source: 45 or 90), which is where
// the timing profile's fit puts stoppage exposure. With a half-life (days, > 0) each goal weighs
// 2^(−age / half-life), its age counted from the latest of the matches, and the counts are
// scaled to the effective number of goals; 0 counts every goal once.
fit::MinuteCounts regulation_minute_counts(std::span<const MatchTimeline> matches,
                                           double half_life_days = 0.0);

// Regulation goals, and those of them in stoppage time (45+k, 90+k with k ≥ 1), for a source that
// gives stoppage minutes (the championship files; the international reader marks every goal of
// minutes 45 and 90 as stoppage, so its matches must not be counted here).
struct StoppageCounts {
    int regulation_goals = 0;
    int stoppage_goals = 0;
};
StoppageCounts stoppage_counts(std::span<const MatchTimeline> matches);

struct ShootoutRecords {
    std::vector<fit::ShootoutRecord> records;
    int winner_unknown = 0;  // rows whose winner is neither side: left out
};

// The international shoot-outs file: winner, and the first kicker where named.
ShootoutRecords shootout_records(std::span<const ShootoutRow> rows);
// Shoot-outs of timelines that carry their tally (the championship files).
ShootoutRecords shootout_records(std::span<const MatchTimeline> matches);

}  // namespace liveprob::datasets
