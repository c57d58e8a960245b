// One finished match as the in-play fits read it, and what they derive from it under the
// goal-timing profile: how much exposure each side spent leading, level and trailing in
// regulation with the goals it scored in each state, and the exposure of extra time up to its
// first goal. Exposure is in the engine's units (a whole regulation match with the expected
// stoppage = 1; timing.hpp), so a side with prior λ in state s expects λ·m_s·exposure goals.
#pragma once

#include <array>
#include <optional>
#include <vector>

#include "liveprob/core/messages.hpp"
#include "liveprob/core/params.hpp"

namespace liveprob::fit {

// Where goals sit: minute m (1..90 regulation, 91..120 extra time) is the clock from (m−1):00
// to m:00, except that a period's last minute (45, 90, 105, 120) also holds all of its
// stoppage, as the international source records it (a source minute past a period's end counts
// as its last minute). The goals of one minute, in their order, share its exposure evenly:
// with one goal it sits in the middle, with two at a quarter and three quarters.
struct InplayGoal {
    core::Side side = core::Side::home;
    int minute = 0;
};

struct InplayMatch {
    core::PriorMeans prior;         // expected regulation goals
    std::vector<InplayGoal> goals;  // in the order scored
    bool extra_time = false;        // extra time was played (the match was level after 90)
    // The source lists this match only because it had a goal: goalless matches cannot be told
    // from unrecorded ones. The fits then condition on at least one regulation goal.
    bool listed_for_goals = false;
};

enum class ScoreState : int { leading = 0, level = 1, trailing = 2 };
inline constexpr int kScoreStates = 3;

// One side of one match over regulation.
struct SideStates {
    double prior = 0.0;                           // λ of the side
    std::array<double, kScoreStates> exposure{};  // by ScoreState
    std::array<int, kScoreStates> goals{};        // goals scored while in that state
    double total_exposure() const noexcept { return exposure[0] + exposure[1] + exposure[2]; }
    int total_goals() const noexcept { return goals[0] + goals[1] + goals[2]; }
};

struct RegulationRecord {
    std::array<SideStates, 2> sides;  // home, away
    bool listed_for_goals = false;
};

struct ExtraTimeRecord {
    RegulationRecord regulation;          // for the strength posterior at the start of extra time
    double extra_time_exposure = 0.0;     // all of extra time (extra_time_factor = 1)
    double exposure_to_first_goal = 0.0;  // the part before its first goal (all of it when
                                          // none came)
    std::optional<core::Side> first_scorer;
};

// Cumulative exposure from kick-off to each goal, under `timing`: regulation goals in [0, 1],
// extra-time goals beyond 1 at `timing.extra_time_factor`. A match's exposure is its expected
// one (the stoppage actually played is unknown), so a late stoppage goal sits inside the
// expected stoppage.
[[nodiscard]] std::vector<double> goal_exposures(const std::vector<InplayGoal>& goals,
                                                 const core::TimingProfile& timing);

// Regulation goals only (minutes 1..90), in the goals' order.
[[nodiscard]] RegulationRecord regulation_record(const InplayMatch& match,
                                                 const core::TimingProfile& timing);

// For a match with extra time: the first extra-time goal and the exposure before it.
[[nodiscard]] ExtraTimeRecord extra_time_record(const InplayMatch& match,
                                                const core::TimingProfile& timing);

}  // namespace liveprob::fit
