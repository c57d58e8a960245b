// The demo league's schedule and simulator: the double round robin's defining properties,
// reproducibility from the seed, and a season that exercises every kind of feed message.
#include <catch2/catch.hpp>

#include <map>
#include <set>
#include <string>
#include <utility>

#include "liveprob/core/match.hpp"
#include "liveprob/demo/demo_league.hpp"
#include "liveprob/demo/demo_season.hpp"

using namespace liveprob;

using namespace liveprob::core;
using namespace liveprob::demo;

TEST_CASE("double round robin: each pair meets twice with home and away swapped", "[demo]") {
    for (const int n : {2, 4, 6, 20}) {
        const auto fixtures = double_round_robin(n);
        // n(n-1) matches in 2(n-1) rounds (common practice: 20 clubs, 38 rounds, 380 matches).
        CHECK(fixtures.size() == static_cast<std::size_t>(n * (n - 1)));
        std::set<std::pair<int, int>> ordered_pairs;
        std::map<int, int> matches_per_club, home_per_club;
        std::map<int, std::set<int>> clubs_per_round;
        int last_round = 0;
        for (const auto& f : fixtures) {
            CHECK(f.home != f.away);
            ordered_pairs.insert({f.home, f.away});
            ++matches_per_club[f.home];
            ++matches_per_club[f.away];
            ++home_per_club[f.home];
            // Nobody plays twice in a round.
            CHECK(clubs_per_round[f.round].insert(f.home).second);
            CHECK(clubs_per_round[f.round].insert(f.away).second);
            last_round = std::max(last_round, f.round);
        }
        CHECK(ordered_pairs.size() ==
              static_cast<std::size_t>(n * (n - 1)));  // every (home, away) once
        CHECK(last_round == 2 * (n - 1));
        for (int c = 0; c < n; ++c) {
            CHECK(matches_per_club[c] == 2 * (n - 1));
            CHECK(home_per_club[c] == n - 1);
        }
    }
    CHECK_THROWS(double_round_robin(5));
}

TEST_CASE("the demo league is the same from the same seed and differs from another", "[demo]") {
    const auto a = make_demo_league(7), b = make_demo_league(7), c = make_demo_league(8);
    REQUIRE(a.clubs.size() == 20);
    CHECK(a.season.size() == 380);
    CHECK(a.cup_entrants.size() == 16);
    std::set<std::string> names;
    for (std::size_t i = 0; i < a.clubs.size(); ++i) {
        CHECK(a.clubs[i].name == b.clubs[i].name);
        CHECK(a.clubs[i].attack == b.clubs[i].attack);
        names.insert(a.clubs[i].name);
    }
    CHECK(names.size() == 20);
    CHECK(a.clubs[0].attack != c.clubs[0].attack);

    const auto s1 = simulate_demo_season(a, 7), s2 = simulate_demo_season(b, 7);
    REQUIRE(s1.league.size() == s2.league.size());
    for (std::size_t i = 0; i < s1.league.size(); ++i)
        CHECK(s1.league[i].messages == s2.league[i].messages);
    REQUIRE(s1.cup.size() == s2.cup.size());
    for (std::size_t i = 0; i < s1.cup.size(); ++i) CHECK(s1.cup[i].messages == s2.cup[i].messages);
}

TEST_CASE("a demo season sends every kind of feed message and the engine accepts it", "[demo]") {
    const auto league = make_demo_league(2031);
    const auto season = simulate_demo_season(league, 2031);
    CHECK(season.league.size() == 380);
    CHECK(season.cup.size() >= 15);  // 8 + 4 + 2 + 1 ties, more if one was abandoned

    std::set<std::string> kinds;
    int extra_time = 0, shootouts = 0, rejected = 0;
    double goals = 0;
    auto check = [&](const SimulatedMatch& sim) {
        REQUIRE(std::holds_alternative<MatchSetup>(sim.messages.front().body));
        const auto& setup = std::get<MatchSetup>(sim.messages.front().body);
        Match match(sim.messages.front().header.match_id, setup);
        for (std::size_t i = 1; i < sim.messages.size(); ++i) {
            const auto result = match.apply(sim.messages[i]);
            if (result.verdict != Verdict::accepted) ++rejected;
        }
        for (const auto& m : sim.messages) kinds.insert(kind_name(m.body));
        // The engine's fold agrees with the simulator about the score that stood.
        CHECK(match.state().regulation_goals == sim.regulation_goals);
        CHECK(match.state().extra_time_goals == sim.extra_time_goals);
        CHECK(match.outputs().status ==
              (sim.abandoned ? MatchStatus::abandoned : MatchStatus::finished));
        if (sim.extra_time_goals[0] + sim.extra_time_goals[1] > 0 ||
            match.state().period >= Period::extra_first)
            ++extra_time;
        if (match.state().shootout.taken[0] > 0) ++shootouts;
        goals += sim.regulation_goals[0] + sim.regulation_goals[1];
    };
    for (const auto& sim : season.league) check(sim);
    for (const auto& sim : season.cup) check(sim);
    // A season's cup has only 15 ties; 200 more knock-out ties make shoot-outs certain.
    for (std::uint64_t k = 0; k < 200; ++k) {
        MatchPlan plan;
        plan.match_id = 900'000 + k;
        plan.home = &league.clubs[k % 20];
        plan.away = &league.clubs[(k + 7) % 20];
        plan.format.extra_time = plan.format.shootout = true;
        plan.seed = match_seed(99, plan.match_id);
        check(simulate_match(plan));
    }
    CHECK(rejected == 0);
    std::string seen;
    for (const auto& k : kinds) seen += k + " ";
    INFO("kinds seen: " << seen);
    CHECK(kinds.size() == std::variant_size_v<MessageBody>);
    CHECK(extra_time > 0);
    CHECK(shootouts > 0);
    // Goals per league match in the range football shows (common practice: about 2.5 to 3).
    const double per_match =
        goals / static_cast<double>(season.league.size() + season.cup.size() + 200);
    CHECK(per_match > 2.2);
    CHECK(per_match < 3.3);
}
