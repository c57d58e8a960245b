// A finished match's timeline (match_timelines.hpp) as the feed a live source would have sent:
// the setup with the pre-match prior, the start and end of every period, each goal at its
// minute, the feed's clock reading every five minutes, the shoot-out kick by kick, the final
// whistle. What the source does not say is filled in the same way for every match:
//  - a goal in minute m, s minutes into stoppage ("m+s"), is placed at (m+s-1):30 of the
//    running clock. The international source folds stoppage into the half's last minute (45,
//    90), so its reader makes such a goal "45+1": placed after the half's nominal end, it is
//    never shown before a bucket minute it may have followed;
//  - a half ends at its nominal end plus the usual stoppage (2 minutes in the first half, 4 in
//    the second, 1 in each extra-time half; common practice, from memory), or 30 seconds after
//    its last goal if that is later;
//  - kick-off at the source's time, else 15:00 UTC; 15 minutes of half-time, 5 before extra
//    time (the source gives neither);
//  - a shoot-out whose kicks the source does not give (it names only the winner): the winner
//    converts five and the loser four (5-4). With the score of the shoot-out, the first kick
//    sequence (ABAB order, home first unless the source names the first kicker or only the
//    away side kicking first can reach the score) that reaches it. Either way the order of
//    kicks is a reconstruction; the backtest scores the regulation result only;
//  - a match whose goal minutes the source does not give (goal_minutes_known false: the league
//    files' half-time and full-time scores): the first half's goals at 44:30 with one clock
//    reading at 45:00, the second half's goals at 92:30, and no other clock reading, so that
//    only the kick-off and 45' forecasts are read from it (match_replay.hpp);
//  - a tie that went to extra time is set up as a knock-out (extra time, then a shoot-out if
//    level; without one when it ended level and no shoot-out is recorded: before shoot-outs
//    such ties were replayed another day). The source does not say which other matches were
//    knock-outs; a match decided in regulation is set up as a plain match. P(home/draw/away)
//    refer to full time either way, so this never changes what the backtest scores.
#pragma once

#include <cstdint>
#include <vector>

#include "liveprob/core/messages.hpp"
#include "liveprob/datasets/match_timelines.hpp"

namespace liveprob::datasets {

inline constexpr std::uint32_t kTimelineClockSyncMinutes = 5;

std::vector<core::InboundMessage> feed_from_timeline(const MatchTimeline& match,
                                                     std::uint64_t match_id,
                                                     const core::PriorMeans& prior);

// The shoot-out kicks written for `shootout` (exposed for tests): ABAB order from the first
// kicker, ending as soon as the shoot-out is decided, with the winner ahead.
std::vector<core::ShootoutKick> reconstructed_kicks(const TimelineShootout& shootout);

}  // namespace liveprob::datasets
