// The league folder read as one record per league, on small invented files: renamed clubs kept
// as one team (and two clubs with a word in common kept apart), promoted sides listed with the
// sides they replaced, a 0-0 without a half-time score kept with 0-0 at half-time, other
// matches without one kept for the ratings only, awarded and unplayed matches left out, dates
// outside the season counted.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <fstream>

#include "liveprob/datasets/league_record.hpp"
#include "test_env.hpp"

using namespace liveprob::datasets;

namespace {

// One season's file: a double round robin of `sides`, every match 1-0 with half-time 1-0,
// dated from `first_day` on, a week apart; `extra` is appended to the list of matches.
void season_file(const std::filesystem::path& dir, const std::string& season,
                 const std::vector<std::string>& sides, const std::string& first_day,
                 const std::string& extra = "") {
    std::filesystem::create_directories(dir / season);
    std::string matches;
    int week = 0;
    for (std::size_t i = 0; i < sides.size(); ++i)
        for (std::size_t j = 0; j < sides.size(); ++j) {
            if (i == j) continue;
            matches += fmt::format(
                R"({{"round": "R", "date": "{}-{:02}", "team1": "{}", "team2": "{}", "score": {{"ht": [1, 0], "ft": [1, 0]}}}},)",
                first_day, 1 + week++, sides[i], sides[j]);
        }
    matches += extra;
    if (matches.back() == ',') matches.pop_back();
    std::ofstream(dir / season / "xx.1.json")
        << R"({"name": "Invented League", "matches": [)" << matches << "]}";
}

}  // namespace

TEST_CASE("league renames: one team across a rename, two teams sharing a word kept apart",
          "[import]") {
    // The season before: a club-form abbreviation, a founding year, "Bor." for the word it begins.
    CHECK(could_be_renamed("Harbour Town", "FC Harbour Town 1890", true));
    CHECK(could_be_renamed("Bor. Hillcrest", "Borough Hillcrest", true));
    CHECK(could_be_renamed("Millbrook", "Millbrook Rovers", true));
    CHECK_FALSE(could_be_renamed("Millbrook Rovers", "Stonegate Rovers", true));
    // Away for a season or more: equal words, or the shorter with two words at least.
    CHECK(could_be_renamed("Stonegate Athletic", "AC Stonegate Athletic 1901", false));
    CHECK_FALSE(could_be_renamed("Stonegate", "Stonegate Rovers", false));
}

TEST_CASE("league folder: renames, promoted sides, half-time scores, unplayed and awarded",
          "[import]") {
    const auto dir = liveprob::test::scratch_dir("league-record");
    season_file(dir, "2030-31", {"Harbour", "Hillcrest", "Millbrook", "Stonegate"}, "2030-08");
    // Next season: "Harbour" is spelled "FC Harbour 1890", "Stonegate" went down and
    // "Stonegate Rovers", another club whose name contains the relegated one's, came up: the
    // rule alone would take it for a rename; an alias of the spelling to itself settles it.
    season_file(
        dir, "2031-32", {"FC Harbour 1890", "Hillcrest", "Millbrook", "Stonegate Rovers"},
        "2031-09",
        R"({"date": "2032-03-01", "team1": "Hillcrest", "team2": "Millbrook", "score": {"ft": [0, 0]}},)"
        R"({"date": "2032-03-08", "team1": "Millbrook", "team2": "Hillcrest", "score": {"ft": [2, 1]}},)"
        R"({"date": "2032-03-15", "team1": "Millbrook", "team2": "Stonegate Rovers", "score": {"ft": [0, 3]}, "status": "awarded"},)"
        R"({"date": "2032-03-22", "team1": "Hillcrest", "team2": "Stonegate Rovers", "score": {}, "status": "cancelled"},)"
        R"({"date": "2032-09-22", "team1": "Stonegate Rovers", "team2": "Hillcrest", "score": {"ht": [0, 0], "ft": [0, 0]}},)");
    const auto unsettled = read_league_folder(dir.string());
    CHECK(unsettled.renames.size() == 2);
    CHECK(unsettled.newcomers.empty());
    const auto r = read_league_folder(dir.string(), {{"Stonegate Rovers", "Stonegate Rovers"}});
    REQUIRE(r.leagues == std::vector<std::string>{"xx.1"});
    REQUIRE(r.renames.size() == 1);
    CHECK(r.renames[0].old_name == "Harbour");
    CHECK(r.renames[0].new_name == "FC Harbour 1890");
    REQUIRE(r.newcomers.size() == 1);
    CHECK(r.newcomers[0].name == "Stonegate Rovers");
    CHECK(r.newcomers[0].stand_ins == std::vector<std::string>{"Stonegate"});
    const auto* stand_ins = r.stand_ins("xx.1", "2031-32", "Stonegate Rovers");
    REQUIRE(stand_ins);
    CHECK_FALSE(r.stand_ins("xx.1", "2031-32", "Hillcrest"));
    const auto& c = r.checks;
    CHECK(c.played == 12 + 12 + 3);
    CHECK(c.half_time_inferred == 1);
    CHECK(c.half_time_missing == 1);
    CHECK(c.awarded == 1);
    CHECK(c.not_played == 1);
    CHECK(c.outside_season == 1);  // dated September of the next year
    CHECK(r.results.at("xx.1").size() == 27);
    CHECK(r.matches.size() == 26);  // the 2-1 without a half-time score is in the ratings only
    // The renamed club plays under one name in the ratings: the league's first spelling.
    int harbour = 0;
    for (const auto& m : r.results.at("xx.1")) {
        CHECK(m.home != "FC Harbour 1890");
        harbour += m.home == "Harbour" || m.away == "Harbour";
    }
    CHECK(harbour == 12);
    // The inferred half-time 0-0: no goals at all; goal minutes are unknown in every match.
    for (const auto& t : r.matches) CHECK_FALSE(t.goal_minutes_known);
}
