#include "liveprob/demo/demo_season.hpp"

namespace liveprob::demo {

namespace {
// The season opens on a Saturday at 15:00 UTC (2031-08-02, an invented season); league rounds
// are a week apart, cup rounds fall on the Wednesday after.
constexpr std::int64_t kSeasonStartUs = 1'943'622'000'000'000;
constexpr std::int64_t kDayUs = 86'400LL * 1'000'000;
}  // namespace

std::uint64_t match_seed(std::uint64_t season_seed, std::uint64_t match_id) noexcept {
    std::uint64_t z = season_seed + 0x9E3779B97F4A7C15ULL * (match_id + 1);
    z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
    z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
    return z ^ (z >> 31);
}

DemoSeason simulate_demo_season(const DemoLeague& league, std::uint64_t seed) {
    DemoSeason season;
    std::uint64_t id = kLeagueMatchIdBase;
    for (const auto& fixture : league.season) {
        MatchPlan plan;
        plan.match_id = ++id;
        plan.home = &league.clubs[static_cast<std::size_t>(fixture.home)];
        plan.away = &league.clubs[static_cast<std::size_t>(fixture.away)];
        plan.kickoff_us = kSeasonStartUs + (fixture.round - 1) * 7 * kDayUs;
        plan.seed = match_seed(seed, plan.match_id);
        plan.competition = league.name;
        season.league.push_back(simulate_match(plan));
    }

    // The cup: single ties with extra time and a shoot-out; the final at a neutral venue.
    std::vector<int> alive = league.cup_entrants;
    id = kCupMatchIdBase;
    int round = 0;
    while (alive.size() > 1) {
        std::vector<int> next;
        for (std::size_t k = 0; k + 1 < alive.size(); k += 2) {
            MatchPlan plan;
            plan.home = &league.clubs[static_cast<std::size_t>(alive[k])];
            plan.away = &league.clubs[static_cast<std::size_t>(alive[k + 1])];
            plan.format.extra_time = true;
            plan.format.shootout = true;
            plan.neutral_venue = alive.size() == 2;
            plan.competition = league.cup_name;
            plan.kickoff_us = kSeasonStartUs + (4 + 8 * round) * 7 * kDayUs + 4 * kDayUs;
            for (;;) {  // an abandoned tie is played again under a new match id
                plan.match_id = ++id;
                plan.seed = match_seed(seed, plan.match_id);
                season.cup.push_back(simulate_match(plan));
                if (!season.cup.back().abandoned) break;
                plan.kickoff_us += 7 * kDayUs;
            }
            next.push_back(season.cup.back().winner == core::Side::home ? alive[k] : alive[k + 1]);
        }
        alive = std::move(next);
        ++round;
    }
    return season;
}

}  // namespace liveprob::demo
