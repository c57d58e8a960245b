// The import of the open datasets against an independent reading of the same files (Python's
// csv and json modules, tests/reference/scripts/): the matches taken, and for each one the feed
// the importer writes, folded by the engine, ends with the score the files record, goal by goal
// in regulation and extra time, and with the recorded shoot-out winner.
#include <catch2/catch.hpp>

#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "liveprob/core/match.hpp"
#include "liveprob/datasets/match_timelines.hpp"
#include "liveprob/datasets/timeline_feed.hpp"
#include "test_env.hpp"

using namespace liveprob;
using namespace liveprob::datasets;

using namespace liveprob::core;
using liveprob::datasets::MatchTimeline;

namespace {

std::vector<std::vector<std::string>> read_tsv(const std::filesystem::path& path) {
    std::vector<std::vector<std::string>> rows;
    std::ifstream in(path);
    for (std::string line; std::getline(in, line);) {
        std::vector<std::string> fields;
        std::stringstream s(line);
        for (std::string f; std::getline(s, f, '\t');) fields.push_back(f);
        if (line.ends_with('\t')) fields.emplace_back();
        rows.push_back(std::move(fields));
    }
    return rows;
}

std::vector<std::string> split(const std::string& text, char sep) {
    std::vector<std::string> out;
    if (text.empty()) return out;
    std::stringstream s(text);
    for (std::string f; std::getline(s, f, sep);) out.push_back(f);
    return out;
}

std::filesystem::path run_script(const std::string& script, const std::filesystem::path& input,
                                 const std::string& name) {
    const auto out = liveprob::test::scratch_dir(name) / "out.tsv";
    const auto command =
        fmt::format("{} {} {} {}", liveprob::test::system_python(),
                    (liveprob::test::source_dir() / "tests/reference/scripts" / script).string(),
                    input.string(), out.string());
    REQUIRE(liveprob::test::run_command(command).exit_code == 0);
    return out;
}

// The feed of `t` folded by the engine.
struct Folded {
    MatchState state;
    std::uint64_t rejected = 0;
    std::string first_rejection;
};

Folded fold(const MatchTimeline& t, std::uint64_t id) {
    const auto feed = datasets::feed_from_timeline(t, id, PriorMeans{1.4, 1.1});
    Match match(id, std::get<MatchSetup>(feed.front().body));
    Folded out;
    for (std::size_t i = 1; i < feed.size(); ++i) {
        const auto r = match.apply(feed[i]);
        if (r.verdict == Verdict::rejected && out.rejected++ == 0) {
            out.first_rejection = fmt::format("message {} ({}): {}", i, kind_name(feed[i].body),
                                              reject_reason_name(r.reason));
        }
    }
    out.state = match.state();
    return out;
}

}  // namespace

TEST_CASE(
    "international import: the matches taken and each feed's folded score agree with the files",
    "[import][open-data]") {
    const auto dir = liveprob::test::open_data_dir() / "international";
    const auto read = datasets::read_international_timelines(dir.string());
    // line -> the Python reading of that row
    std::map<std::uint32_t, std::vector<std::string>> python;
    std::size_t python_selected = 0;
    for (auto& row : read_tsv(run_script("international_scores.py", dir, "import-international"))) {
        REQUIRE(row.size() == 7);
        python_selected += row[6] == "1";
        python[static_cast<std::uint32_t>(std::stoul(row[0]))] = std::move(row);
    }
    // Same rule, two readings: the same matches.
    CHECK(read.matches.size() == python_selected);
    CHECK(read.matches.size() > 12'000);
    std::size_t checked = 0, with_extra_time = 0, with_shootout = 0;
    for (const MatchTimeline& t : read.matches) {
        const auto it = python.find(t.origin_number);
        REQUIRE(it != python.end());
        const auto& row = it->second;
        INFO(t.origin);
        REQUIRE(row[6] == "1");
        const Folded f = fold(t, 1'000'000 + t.origin_number);
        INFO(f.first_rejection);
        REQUIRE(f.rejected == 0);
        REQUIRE(f.state.status == MatchStatus::finished);
        CHECK(f.state.goals(Side::home) == std::stoi(row[1]));
        CHECK(f.state.goals(Side::away) == std::stoi(row[2]));
        for (const Side side : {Side::home, Side::away}) {
            int regulation = 0, extra = 0;
            for (const auto& m : split(row[3 + static_cast<std::size_t>(index(side))], ','))
                (std::stoi(m) <= 90 ? regulation : extra) += 1;
            CHECK(f.state.regulation_goals[static_cast<std::size_t>(index(side))] == regulation);
            CHECK(f.state.extra_time_goals[static_cast<std::size_t>(index(side))] == extra);
        }
        if (row[5] != "-") {
            ++with_shootout;
            const auto scored = f.state.shootout.scored;
            CHECK((scored[0] > scored[1] ? "h" : "a") == row[5]);
        }
        with_extra_time += t.extra_time;
        ++checked;
    }
    CHECK(checked == read.matches.size());
    CHECK(with_extra_time > 100);
    CHECK(with_shootout > 50);
}

TEST_CASE(
    "championship import: extra time, shoot-out scores and a file error, as the file records them",
    "[import][open-data]") {
    for (const char* year : {"2020", "2024"}) {
        const auto file = liveprob::test::open_data_dir() / "euro" / year / "euro.json";
        INFO(file.string());
        const auto read = datasets::read_championship_timelines(file.string());
        std::map<std::uint32_t, std::vector<std::string>> python;
        for (auto& row : read_tsv(run_script("championship_scores.py", file,
                                             std::string("import-championship-") + year))) {
            REQUIRE(row.size() == 6);
            python[static_cast<std::uint32_t>(std::stoul(row[0]))] = std::move(row);
        }
        REQUIRE(python.size() == 51);
        // The 2020 file lists match 48's four goals under the side that conceded them: left out.
        CHECK(read.matches.size() + static_cast<std::size_t>(read.skipped.total()) == 51);
        CHECK(read.skipped.goals_incomplete == (std::string(year) == "2020" ? 1 : 0));
        for (const MatchTimeline& t : read.matches) {
            INFO(t.origin);
            const auto& row = python.at(t.origin_number);
            const Folded f = fold(t, 2'000'000 + t.origin_number);
            INFO(f.first_rejection);
            REQUIRE(f.rejected == 0);
            REQUIRE(f.state.status == MatchStatus::finished);
            const auto minutes_home = split(row[4], ','), minutes_away = split(row[5], ',');
            CHECK(f.state.goals(Side::home) == static_cast<int>(minutes_home.size()));
            CHECK(f.state.goals(Side::away) == static_cast<int>(minutes_away.size()));
            const std::string final_score =
                fmt::format("{}-{}", f.state.goals(Side::home), f.state.goals(Side::away));
            const std::string regulation =
                fmt::format("{}-{}", f.state.regulation_goals[0], f.state.regulation_goals[1]);
            if (row[2] != "-") {
                CHECK(row[1] == regulation);
                CHECK(row[2] == final_score);
            } else {
                // Without an extra-time score the file's "ft" is the final score (it is the score
                // after extra time in the two 2024 matches whose goal minutes show extra time).
                CHECK(row[1] == final_score);
            }
            CHECK(t.extra_time ==
                  (f.state.extra_time_goals != std::array<int, 2>{0, 0} || row[2] != "-"));
            if (row[3] != "-") {
                CHECK(fmt::format("{}-{}", f.state.shootout.scored[0],
                                  f.state.shootout.scored[1]) == row[3]);
            }
        }
    }
}
