// The demo league: invented clubs in invented towns, a double round robin season and a
// knock-out cup. Every name here is made up for the demo.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

namespace liveprob::demo {

struct DemoClub {
    std::string name;
    std::string town;
    std::vector<std::string> players;  // a squad of invented names
    double attack = 0.0;               // true log-rate strengths the simulator plays with
    double defence = 0.0;              // (higher defence concedes less)
    double home_edge = 0.0;            // the club's own home advantage, log scale
};

struct Fixture {
    int round = 0;  // 1-based
    int home = 0;   // index into clubs
    int away = 0;
};

// Double round robin by the circle method: n-1 rounds in which every club meets every other
// once, then the same rounds again with home and away swapped. n must be even and >= 2.
std::vector<Fixture> double_round_robin(int clubs);

struct DemoLeague {
    std::string name;
    std::string cup_name;  // the knock-out cup its clubs play
    std::vector<DemoClub> clubs;
    std::vector<Fixture> season;    // 2(n-1) rounds
    std::vector<int> cup_entrants;  // 16 clubs in bracket order (1 v 2, 3 v 4, ...)
};

// The league with its clubs drawn from `seed`; the same seed gives the same league.
DemoLeague make_demo_league(std::uint64_t seed, int clubs = 20);

}  // namespace liveprob::demo
