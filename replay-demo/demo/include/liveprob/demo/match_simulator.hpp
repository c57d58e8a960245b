// Plays one demo match minute by minute and writes what a feed would send about it. The
// dynamics are deliberately NOT the engine's model, so a backtest on demo data is a fair test:
// momentum after a goal, fatigue that grows with the square of time, a home edge that varies by
// club and by match, a trailing side that pushes late, red cards, stoppage time, goals
// cancelled on review, penalties, own goals, injury stoppages of the clock, shots with xG,
// feed score corrections and, rarely, an abandoned match.
#pragma once

#include <array>
#include <cstdint>
#include <string>
#include <vector>

#include "liveprob/core/messages.hpp"
#include "liveprob/demo/demo_league.hpp"

namespace liveprob::demo {

struct MatchPlan {
    std::uint64_t match_id = 0;
    const DemoClub* home = nullptr;
    const DemoClub* away = nullptr;
    core::CompetitionFormat format;
    bool neutral_venue = false;
    std::int64_t kickoff_us = 0;
    std::uint64_t seed = 0;
    std::string competition;  // the invented league's or cup's name, for screens
};

struct SimulatedMatch {
    std::vector<core::InboundMessage> messages;  // the setup first, then the feed in order
    std::array<int, 2> regulation_goals{};       // goals that stood (not cancelled)
    std::array<int, 2> extra_time_goals{};
    std::array<int, 2> shootout_goals{};
    bool abandoned = false;
    core::Side winner = core::Side::home;  // meaningful for a finished knock-out tie
};

// Expected regulation goals the feed publishes for the plan: the clubs' strengths seen through
// an estimate (so the engine's prior is close to, not equal to, the truth).
core::PriorMeans published_prior(const MatchPlan& plan);

SimulatedMatch simulate_match(const MatchPlan& plan);

}  // namespace liveprob::demo
