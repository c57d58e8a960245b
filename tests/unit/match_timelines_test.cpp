// The open-data timeline readers and the feed built from a timeline, on small invented files:
// which matches are taken (complete goal records, coverage of goalless matches, second legs),
// where goals land on the clock, and the shoot-out kicks written when the source gives only the
// winner or the shoot-out's score.
#include <catch2/catch.hpp>

#include <fstream>

#include "liveprob/core/match.hpp"
#include "liveprob/core/match_state.hpp"
#include "liveprob/datasets/match_timelines.hpp"
#include "liveprob/datasets/timeline_feed.hpp"
#include "liveprob/fit/calendar.hpp"
#include "test_env.hpp"

using namespace liveprob;

using namespace liveprob::core;
using namespace liveprob::datasets;

namespace {

void write(const std::filesystem::path& path, const std::string& text) {
    std::ofstream(path) << text;
}

// Invented sides of the project's demo world.
std::filesystem::path international_fixture() {
    const auto dir = liveprob::test::scratch_dir("timelines-international");
    write(dir / "results.csv",
          "date,home_team,away_team,home_score,away_score,tournament,city,country,neutral\n"
          "2001-03-01,Harbour,Hillcrest,2,1,Coast Cup,Port,Harbour,FALSE\n"      // line 2: complete
          "2001-03-02,Millbrook,Stonegate,0,0,Coast Cup,Mill,Millbrook,FALSE\n"  // 3: goalless,
                                                                                 // covered
          "2001-03-03,Harbour,Stonegate,1,1,Coast Cup,Port,Harbour,TRUE\n"       // 4: shoot-out, ET
                                                                                 // goals none
          "2001-03-04,Hillcrest,Millbrook,3,2,Coast Cup,Hill,Hillcrest,FALSE\n"  // 5: extra time
                                                                                 // 2-2 -> 3-2
          "2001-03-05,Stonegate,Harbour,2,0,Coast Cup,Stone,Stonegate,FALSE\n"  // 6: second leg: ET
                                                                                // after 1-0
          "2001-04-01,Harbour,Millbrook,1,0,Friendly,Port,Harbour,FALSE\n"  // 7: no goal records
          "2001-04-02,Hillcrest,Stonegate,0,0,Friendly,Hill,Hillcrest,FALSE\n"  // 8: goalless, not
                                                                                // covered
          "2001-04-03,Millbrook,Harbour,NA,NA,Friendly,Mill,Millbrook,FALSE\n"  // 9: no result
          "2001-03-06,Millbrook,Hillcrest,2,0,Coast Cup,Mill,Millbrook,FALSE\n");  // 10: a goal
                                                                                   // without minute
    write(dir / "goalscorers.csv",
          "date,home_team,away_team,team,scorer,minute,own_goal,penalty\n"
          "2001-03-01,Harbour,Hillcrest,Harbour,A,45,FALSE,FALSE\n"
          "2001-03-01,Harbour,Hillcrest,Hillcrest,B,12,TRUE,FALSE\n"
          "2001-03-01,Harbour,Hillcrest,Harbour,C,90,FALSE,TRUE\n"
          "2001-03-03,Harbour,Stonegate,Stonegate,D,30,FALSE,FALSE\n"
          "2001-03-03,Harbour,Stonegate,Harbour,E,77,FALSE,FALSE\n"
          "2001-03-04,Hillcrest,Millbrook,Hillcrest,F,10,FALSE,FALSE\n"
          "2001-03-04,Hillcrest,Millbrook,Millbrook,G,20,FALSE,FALSE\n"
          "2001-03-04,Hillcrest,Millbrook,Millbrook,G,50,FALSE,FALSE\n"
          "2001-03-04,Hillcrest,Millbrook,Hillcrest,H,60,FALSE,FALSE\n"
          "2001-03-04,Hillcrest,Millbrook,Hillcrest,I,118,FALSE,FALSE\n"
          "2001-03-05,Stonegate,Harbour,Stonegate,J,40,FALSE,FALSE\n"
          "2001-03-05,Stonegate,Harbour,Stonegate,J,100,FALSE,FALSE\n"
          "2001-03-06,Millbrook,Hillcrest,Millbrook,K,3,FALSE,FALSE\n"
          "2001-03-06,Millbrook,Hillcrest,Millbrook,K,NA,FALSE,FALSE\n");
    write(dir / "shootouts.csv",
          "date,home_team,away_team,winner,first_shooter\n"
          "2001-03-03,Harbour,Stonegate,Stonegate,Harbour\n");
    return dir;
}

}  // namespace

TEST_CASE(
    "international timelines: complete records, covered goalless matches, extra time, second legs",
    "[import]") {
    const auto read = read_international_timelines(international_fixture().string(), {0.5});
    // Coast Cup 2001: 5 scoring matches, 4 complete (80% >= 50%): covered. Friendly 2001: 0 of 1.
    REQUIRE(read.matches.size() == 4);
    CHECK(read.skipped.no_result == 1);
    CHECK(read.skipped.not_covered == 2);
    CHECK(read.skipped.goals_incomplete == 1);
    CHECK(read.skipped.aggregate_tie == 1);
    CHECK(read.shootouts_without_tally == 1);

    const MatchTimeline& first = read.matches[0];
    CHECK(first.origin_number == 2);
    CHECK(first.regulation_goals == std::array<int, 2>{2, 1});
    REQUIRE(first.goals.size() == 3);
    CHECK(first.goals[0].minute == 12);
    CHECK(first.goals[0].own_goal);
    CHECK(first.goals[0].side == Side::away);                              // credited side
    CHECK((first.goals[1].minute == 45 && first.goals[1].stoppage == 1));  // 45 read as 45+1
    CHECK((first.goals[2].minute == 90 && first.goals[2].stoppage == 1 && first.goals[2].penalty));
    CHECK_FALSE(first.extra_time);

    CHECK(read.matches[1].goals.empty());  // the covered goalless match
    const MatchTimeline& shootout = read.matches[2];
    CHECK(shootout.extra_time);
    REQUIRE(shootout.shootout);
    CHECK(shootout.shootout->winner == Side::away);
    CHECK(shootout.shootout->first_kicker == Side::home);
    const MatchTimeline& extra = read.matches[3];
    CHECK(extra.extra_time);
    CHECK(extra.regulation_goals == std::array<int, 2>{2, 2});
    CHECK(extra.extra_time_goals == std::array<int, 2>{1, 0});
}

TEST_CASE(
    "a timeline's feed: goals at their clock, a reading every five minutes, the engine accepts all",
    "[import]") {
    const auto read = read_international_timelines(international_fixture().string(), {0.5});
    for (const MatchTimeline& t : read.matches) {
        const auto feed = feed_from_timeline(t, 77, PriorMeans{1.5, 1.0});
        Match match(77, std::get<MatchSetup>(feed.front().body));
        for (std::size_t i = 1; i < feed.size(); ++i) {
            INFO(t.origin << " message " << i << " " << kind_name(feed[i].body));
            CHECK(match.apply(feed[i]).verdict == Verdict::accepted);
        }
        CHECK(match.state().status == MatchStatus::finished);
        CHECK(match.state().regulation_goals == t.regulation_goals);
        CHECK(match.state().extra_time_goals == t.extra_time_goals);
        // Source sequence numbers run 1, 2, 3, ...; source time never goes backwards.
        for (std::size_t i = 0; i < feed.size(); ++i) {
            CHECK(feed[i].header.source_seq == i + 1);
            if (i > 0) CHECK(feed[i].header.source_time_us >= feed[i - 1].header.source_time_us);
        }
    }
    const auto feed = feed_from_timeline(read.matches[0], 77, PriorMeans{1.5, 1.0});
    std::vector<MatchClock> goals, clocks;
    for (const auto& m : feed) {
        if (std::holds_alternative<Goal>(m.body)) goals.push_back(m.header.clock);
        if (std::holds_alternative<ClockSync>(m.body)) clocks.push_back(m.header.clock);
    }
    // Minute 12 at 11:30; "45+1" at 45:30 of the first half; "90+1" at 90:30.
    CHECK(goals == std::vector<MatchClock>{{Period::first_half, 690'000},
                                           {Period::first_half, 2'730'000},
                                           {Period::second_half, 5'430'000}});
    REQUIRE(clocks.size() == 18);  // 5, 10, ... 45 and 50, ... 90
    CHECK(clocks.front() == MatchClock{Period::first_half, 300'000});
    CHECK(clocks.back() == MatchClock{Period::second_half, 5'400'000});
}

TEST_CASE(
    "shoot-out kicks: 5-4 for the winner when only the winner is known, else the recorded score",
    "[import]") {
    auto tally_of = [](const std::vector<ShootoutKick>& kicks) {
        ShootoutTally t;
        for (std::size_t i = 0; i < kicks.size(); ++i) {
            if (i == 0) t.first = kicks[i].side;
            else CHECK(kicks[i].side == shootout_next_kicker(t));  // ABAB order
            CHECK_FALSE(shootout_decided(t));                      // nothing after the decision
            t.taken[static_cast<std::size_t>(index(kicks[i].side))] += 1;
            t.scored[static_cast<std::size_t>(index(kicks[i].side))] += kicks[i].scored;
        }
        CHECK(shootout_decided(t));
        return t;
    };
    for (const Side winner : {Side::home, Side::away}) {
        for (const Side first : {Side::home, Side::away}) {
            const auto t = tally_of(reconstructed_kicks({winner, first, std::nullopt}));
            CHECK(t.first == first);
            CHECK(t.scored[static_cast<std::size_t>(index(winner))] == 5);
            CHECK(t.scored[static_cast<std::size_t>(index(other(winner)))] == 4);
        }
    }
    for (const std::array<int, 2> score :
         {std::array<int, 2>{1, 3}, {4, 2}, {3, 2}, {5, 3}, {8, 7}, {0, 3}}) {
        const Side winner = score[0] > score[1] ? Side::home : Side::away;
        CHECK(tally_of(reconstructed_kicks({winner, std::nullopt, score})).scored == score);
    }
    // A score no shoot-out can end with (decided long before): the winner-only reconstruction.
    CHECK(tally_of(reconstructed_kicks({Side::home, std::nullopt, std::array<int, 2>{9, 0}}))
              .scored == std::array<int, 2>{5, 4});
}

TEST_CASE("championship timelines: stoppage offsets, extra time and shoot-out score from the file",
          "[import]") {
    const auto dir = liveprob::test::scratch_dir("timelines-championship");
    write(dir / "cup.json", R"({"name": "Coast Cup", "rounds": [{"name": "Final", "matches": [
      {"num": 7, "date": "2030-07-01", "time": "20:45", "team1": {"name": "Harbour"}, "team2": {"name": "Hillcrest"},
       "score": {"ft": [1, 1], "et": [2, 2], "p": [4, 3]},
       "goals1": [{"name": "A", "minute": 45, "offset": 2}, {"name": "B", "minute": 105, "offset": 1}],
       "goals2": [{"name": "C", "minute": 90, "offset": 4, "penalty": true}, {"name": "D", "minute": 110, "owngoal": true}]},
      {"num": 8, "date": "2030-07-02", "time": "18:00", "team1": {"name": "Millbrook"}, "team2": {"name": "Stonegate"},
       "score": {"ft": [0, 2]}, "goals1": [{"name": "E", "minute": 3}, {"name": "F", "minute": 9}]},
      {"num": 9, "date": "2030-07-03", "team1": {"name": "Millbrook"}, "team2": {"name": "Harbour"}, "score": {}}
    ]}]})");
    const auto read = read_championship_timelines((dir / "cup.json").string());
    REQUIRE(read.matches.size() == 1);
    CHECK(read.skipped.goals_incomplete == 1);  // match 8: goals listed under the wrong side
    CHECK(read.skipped.no_result == 1);
    const MatchTimeline& t = read.matches[0];
    CHECK(t.kickoff_minute == 20 * 60 + 45);
    CHECK(t.neutral);
    CHECK(t.extra_time);
    CHECK(t.regulation_goals == std::array<int, 2>{1, 1});
    CHECK(t.extra_time_goals == std::array<int, 2>{1, 1});
    REQUIRE(t.shootout);
    CHECK(t.shootout->winner == Side::home);
    CHECK(t.shootout->tally == std::array<int, 2>{4, 3});
    const auto feed = feed_from_timeline(t, 5, PriorMeans{1.2, 1.2});
    std::vector<MatchClock> goals;
    for (const auto& m : feed)
        if (std::holds_alternative<Goal>(m.body)) goals.push_back(m.header.clock);
    CHECK(goals == std::vector<MatchClock>{{Period::first_half, 2'790'000},      // 45+2 -> 46:30
                                           {Period::second_half, 5'610'000},     // 90+4 -> 93:30
                                           {Period::extra_first, 6'330'000},     // 105+1 -> 105:30
                                           {Period::extra_second, 6'570'000}});  // 110 -> 109:30
    Match match(5, std::get<MatchSetup>(feed.front().body));
    for (std::size_t i = 1; i < feed.size(); ++i)
        CHECK(match.apply(feed[i]).verdict == Verdict::accepted);
    CHECK(match.state().status == MatchStatus::finished);
    CHECK(match.state().shootout.scored == std::array<int, 2>{4, 3});
}

TEST_CASE("championship timelines: matches as one list, sides as names, minutes written \"90+4\"",
          "[import]") {
    const auto dir = liveprob::test::scratch_dir("timelines-championship-list");
    // The same two matches in the two list layouts: {"matches": [...]} and a list at the top.
    const std::string matches = R"([
      {"round": "Final", "date": "2030-07-01", "time": "20:45", "team1": "Harbour", "team2": "Hillcrest",
       "score": {"ht": [1, 0], "ft": [2, 1]},
       "goals1": [{"name": "A", "minute": "45+2"}, {"name": "B", "minute": "90+4"}],
       "goals2": [{"name": "C", "minute": "67"}]},
      {"round": "Final", "date": "2030-07-02", "team1": "Millbrook", "team2": "Stonegate",
       "score": {"ft": [1, 0]}, "goals1": [{"name": "D", "minute": "5x"}]}
    ])";
    write(dir / "object.json", R"({"name": "Coast Cup", "matches": )" + matches + "}");
    write(dir / "list.json", matches);
    for (const char* file : {"object.json", "list.json"}) {
        INFO(file);
        const auto read = read_championship_timelines((dir / file).string());
        REQUIRE(read.matches.size() == 1);
        CHECK(read.skipped.goals_incomplete == 1);  // "5x" is no minute: left out, counted
        const MatchTimeline& t = read.matches[0];
        CHECK(t.home == "Harbour");
        CHECK(t.away == "Hillcrest");
        CHECK(t.origin_number == 1);  // no "num": the match's place in the file
        REQUIRE(t.goals.size() == 3);
        CHECK(t.goals[0].minute == 45);
        CHECK(t.goals[0].stoppage == 2);
        CHECK(t.goals[1].minute == 67);
        CHECK(t.goals[1].stoppage == 0);
        CHECK(t.goals[2].minute == 90);
        CHECK(t.goals[2].stoppage == 4);
        CHECK(t.regulation_goals == std::array<int, 2>{2, 1});
        // Both stoppage goals come after the half's last minute on the feed's clock.
        const auto feed = feed_from_timeline(t, 5, PriorMeans{1.2, 1.2});
        std::vector<MatchClock> goals;
        for (const auto& m : feed)
            if (std::holds_alternative<Goal>(m.body)) goals.push_back(m.header.clock);
        CHECK(goals == std::vector<MatchClock>{{Period::first_half, 2'790'000},     // 45+2
                                               {Period::second_half, 3'990'000},    // 67 -> 66:30
                                               {Period::second_half, 5'610'000}});  // 90+4
        // Every match with a result joins the rating history, the incomplete one too.
        const auto results = read_championship_results((dir / file).string());
        CHECK(results.matches.size() == 2);
    }
}

TEST_CASE("the left-out count of a date window holds only the matches of those dates", "[import]") {
    const auto read = read_international_timelines(international_fixture().string(), {0.5});
    const auto all = read.skips_between(std::nullopt, std::nullopt);
    CHECK(all.total() == read.skipped.total());
    // Everything left out lies in March and April 2001.
    const auto day = [](const char* iso) { return fit::parse_iso_date(iso); };
    CHECK(read.skips_between(day("2001-05-01"), std::nullopt).total() == 0);
    CHECK(read.taken_between(day("2001-05-01"), std::nullopt) == 0);
    const auto april = read.skips_between(day("2001-04-01"), day("2001-05-01"));
    CHECK(april.not_covered == 2);  // lines 7 and 8
    CHECK(april.no_result == 1);    // line 9
    CHECK(april.goals_incomplete == 0);
    CHECK(read.skips_between(day("2001-03-01"), day("2001-04-01")).goals_incomplete == 1);
}
