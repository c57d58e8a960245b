// The results readers on small invented files: a row that cannot be read is an error naming the
// file and line (or, when asked, skipped and counted), a fixture not yet played is skipped and
// counted, and a result two sources give is counted once.
#include <catch2/catch.hpp>

#include <fstream>

#include "liveprob/datasets/results_readers.hpp"
#include "liveprob/fit/calendar.hpp"
#include "test_env.hpp"

using namespace liveprob::datasets;

namespace {

const char* kHeader =
    "date,home_team,away_team,home_score,away_score,tournament,city,country,neutral\n";

std::string results_file(const std::string& name, const std::string& rows) {
    const auto path = liveprob::test::scratch_dir("results-readers-" + name) / "results.csv";
    std::ofstream(path) << kHeader
                        << "2001-03-01,Harbour,Hillcrest,2,1,Coast Cup,Port,Harbour,FALSE\n"
                        << rows;
    return path.string();
}

}  // namespace

TEST_CASE("an unreadable international results row is an error naming the file and line",
          "[import]") {
    struct Case {
        const char* name;
        const char* row;
        const char* reason;
    };
    for (const Case& c : {
             Case{"score", "2001-03-02,Millbrook,Stonegate,two,0,Coast Cup,Mill,Millbrook,FALSE\n",
                  "home_score 'two' is not a whole number"},
             Case{"negative",
                  "2001-03-02,Millbrook,Stonegate,1,-1,Coast Cup,Mill,Millbrook,FALSE\n",
                  "away_score -1 is negative"},
             Case{"date", "2001-02-30,Millbrook,Stonegate,1,0,Coast Cup,Mill,Millbrook,FALSE\n",
                  "date '2001-02-30' is not YYYY-MM-DD"},
             Case{"columns", "2001-03-02,Millbrook,Stonegate,1,0\n", "5 columns, the header has 9"},
             Case{"one-na", "2001-03-02,Millbrook,Stonegate,NA,0,Coast Cup,Mill,Millbrook,FALSE\n",
                  "home_score 'NA' is not a whole number"},
         }) {
        INFO(c.name);
        const auto path = results_file(c.name, c.row);
        try {
            read_international_results(path);
            FAIL("no error");
        } catch (const std::runtime_error& e) {
            CHECK(std::string(e.what()) == path + ":3: " + c.reason);
        }
        // Asked to, the reader skips and counts the row and keeps the rest.
        const auto read = read_international_results(path, BadRows::skip);
        CHECK(read.bad_skipped == 1);
        CHECK(read.matches.size() == 1);
        // The timelines read the same rows, by the same rule.
        CHECK_THROWS_WITH(read_international_rows(path), Catch::Contains(path + ":3"));
    }
}

TEST_CASE("a fixture not yet played (NA, NA) is skipped and counted, not an error", "[import]") {
    const auto path = results_file(
        "unplayed", "2001-03-02,Millbrook,Stonegate,NA,NA,Coast Cup,Mill,Millbrook,FALSE\n");
    const auto read = read_international_results(path);
    CHECK(read.skipped == 1);
    CHECK(read.bad_skipped == 0);
    CHECK(read.matches.size() == 1);
}

TEST_CASE("a row whose tournament is Friendly is marked a friendly, other rows are not",
          "[import]") {
    const auto path = results_file(
        "friendly", "2001-03-02,Millbrook,Stonegate,0,0,Friendly,Mill,Millbrook,FALSE\n");
    const auto read = read_international_results(path);
    REQUIRE(read.matches.size() == 2);
    CHECK_FALSE(read.matches[0].friendly);
    CHECK(read.matches[1].friendly);
}

TEST_CASE("the project's results CSV: a bad row named by line, or skipped and counted",
          "[import]") {
    const auto path = liveprob::test::scratch_dir("results-readers-project") / "r.csv";
    std::ofstream(path) << "date,home,away,home_goals,away_goals,neutral\n"
                        << "2031-08-09,North,South,2,1,0\n"
                        << "2031-08-16,South,North,-2,1,0\n";
    CHECK_THROWS_WITH(read_project_results(path.string()),
                      path.string() + ":3: home_goals -2 is negative");
    const auto read = read_project_results(path.string(), BadRows::skip);
    CHECK(read.bad_skipped == 1);
    CHECK(read.matches.size() == 1);
}

TEST_CASE("a result two sources give joins the history once", "[import]") {
    const int day = *liveprob::fit::parse_iso_date("2030-07-01");
    std::vector<liveprob::fit::MatchResult> history{{day, "Harbour", "Hillcrest", 2, 1, false}};
    // The same match with its sides the other way round (a neutral venue), and a new one.
    const std::vector<liveprob::fit::MatchResult> more{
        {day, "Hillcrest", "Harbour", 1, 2, true}, {day + 1, "Harbour", "Hillcrest", 0, 0, true}};
    CHECK(append_new_results(history, more) == 1);
    REQUIRE(history.size() == 2);
    CHECK(history[1].day == day + 1);
}
