// A whole demo season: every league match of the double round robin and every cup tie, each
// simulated from its own seed so the season is the same however it is computed.
#pragma once

#include <cstdint>
#include <vector>

#include "liveprob/demo/demo_league.hpp"
#include "liveprob/demo/match_simulator.hpp"

namespace liveprob::demo {

inline constexpr std::uint64_t kLeagueMatchIdBase = 100'000;
inline constexpr std::uint64_t kCupMatchIdBase = 200'000;

struct DemoSeason {
    std::vector<SimulatedMatch> league;  // in fixture order
    std::vector<SimulatedMatch> cup;     // round by round; an abandoned tie is replayed
};

// A stream seed per match from the season seed and the match id (SplitMix64 mixing).
std::uint64_t match_seed(std::uint64_t season_seed, std::uint64_t match_id) noexcept;

DemoSeason simulate_demo_season(const DemoLeague& league, std::uint64_t seed);

}  // namespace liveprob::demo
