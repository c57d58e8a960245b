// `liveprob import`, `fit`, `prior`, `fit-inplay` and `calc` as a user runs them, on the mistakes
// found while importing: the left-out summary of a date window, championship spellings mapped
// with --aliases (an unknown side an error naming the closest), a result two sources give
// counted once, an unreadable results row named by file and line (or skipped when asked),
// `fit --as-of` + `prior` giving import's priors, no standard error printed for a value
// fit-inplay did not fit, and prior and calc agreeing on the largest expected goals.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <cmath>
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <vector>

#include "liveprob/core/validate.hpp"
#include "liveprob/files/ratings_file.hpp"
#include "liveprob/protocol/json_feed.hpp"
#include "test_env.hpp"

namespace test = liveprob::test;
namespace fs = std::filesystem;

namespace {

// Runs the program with standard error folded into the captured output.
test::CommandResult run(const std::string& args) {
    return test::run_command(fmt::format("{} {} 2>&1", test::liveprob_binary().string(), args));
}

void write(const fs::path& path, const std::string& text) { std::ofstream(path) << text; }

// An invented international record: results over two years, goal minutes, no shoot-outs.
fs::path invented_international(const std::string& name, const std::string& extra_rows = "") {
    const auto dir = test::scratch_dir(name);
    std::string results =
        "date,home_team,away_team,home_score,away_score,tournament,city,country,neutral\n";
    std::string goals = "date,home_team,away_team,team,scorer,minute,own_goal,penalty\n";
    const char* sides[] = {"Harbour", "Hillcrest", "Millbrook", "Stonegate"};
    int n = 0;
    for (int year : {2001, 2002})
        for (int month = 1; month <= 12; ++month)
            for (int i = 0; i < 4; ++i)
                for (int j = 0; j < 4; ++j) {
                    if (i == j || (i + j + month) % 3 != 0) continue;
                    const std::string date =
                        fmt::format("{}-{:02}-{:02}", year, month, 1 + i * 4 + j);
                    const int hg = (n % 3), ag = (n % 2);
                    ++n;
                    results += fmt::format("{},{},{},{},{},Coast Cup,Port,{},FALSE\n", date,
                                           sides[i], sides[j], hg, ag, sides[i]);
                    // The first match of 2001 lacks a goal minute: left out in 2001 only.
                    for (int g = 0; g < hg; ++g)
                        goals += fmt::format("{},{},{},{},A,{},FALSE,FALSE\n", date, sides[i],
                                             sides[j], sides[i],
                                             n == 2 && g == 0 ? "NA" : std::to_string(10 + 20 * g));
                    for (int g = 0; g < ag; ++g)
                        goals += fmt::format("{},{},{},{},B,{},FALSE,FALSE\n", date, sides[i],
                                             sides[j], sides[j], 55 + 10 * g);
                }
    write(dir / "results.csv", results + extra_rows);
    write(dir / "goalscorers.csv", goals);
    write(dir / "shootouts.csv", "date,home_team,away_team,winner,first_shooter\n");
    return dir;
}

// A championship file (one list of matches) in 2003 with one side spelled its own way, and the
// last match of the international results again, its sides the other way round.
fs::path invented_championship(const fs::path& dir) {
    std::string last;
    {
        std::ifstream in(dir / "results.csv");
        for (std::string line; std::getline(in, line);) last = line;
    }
    std::vector<std::string> f;
    std::stringstream row(last);
    for (std::string field; std::getline(row, field, ',');) f.push_back(field);
    write(dir / "cup.json", fmt::format(R"({{"name": "Coast Trophy", "matches": [
      {{"date": "2003-06-01", "team1": "Harbour FC", "team2": "Hillcrest",
        "score": {{"ft": [1, 0]}}, "goals1": [{{"name": "A", "minute": "90+3"}}], "goals2": []}},
      {{"date": "{}", "team1": "{}", "team2": "{}", "score": {{"ft": [{}, {}]}}}}
    ]}})",
                                        f[0], f[2], f[1], f[4], f[3]));
    return dir / "cup.json";
}

std::string line_of(const fs::path& file, int number) {
    std::ifstream in(file);
    std::string line;
    for (int i = 0; i < number && std::getline(in, line); ++i) {}
    return line;
}

}  // namespace

TEST_CASE("import: the left-out summary counts only the chosen dates", "[import]") {
    const auto dir = invented_international("import_window");
    const auto all = run(fmt::format("import --international {} --coverage 0 --out {} --quiet",
                                     dir.string(), (dir / "all").string()));
    INFO(all.out);
    REQUIRE(all.exit_code == 0);
    CHECK_THAT(all.out, Catch::Contains("1 with goal records incomplete"));
    const auto later =
        run(fmt::format("import --international {} --coverage 0 --from 2002-01-01 --out {} --quiet",
                        dir.string(), (dir / "later").string()));
    INFO(later.out);
    REQUIRE(later.exit_code == 0);
    CHECK_THAT(later.out, Catch::Contains("0 with goal records incomplete"));
}

TEST_CASE("import --aliases: championship spellings mapped, an unknown side named with the closest",
          "[import]") {
    const auto dir = invented_international("import_aliases");
    const auto cup = invented_championship(dir);
    const auto unknown =
        run(fmt::format("import --international {} --championship {} --out {} --quiet",
                        dir.string(), cup.string(), (dir / "a").string()));
    INFO(unknown.out);
    CHECK(unknown.exit_code == 1);
    CHECK_THAT(unknown.out,
               Catch::Contains("'Harbour FC'") && Catch::Contains("closest: 'Harbour'"));

    write(dir / "aliases.csv", "feed_name,rating_name\nHarbour FC,Harbour\n");
    const auto mapped = run(fmt::format(
        "import --international {} --championship {} --aliases {} --out {} --quiet "
        "--form json --from 2003-01-01",
        dir.string(), cup.string(), (dir / "aliases.csv").string(), (dir / "b").string()));
    INFO(mapped.out);
    REQUIRE(mapped.exit_code == 0);
    // The stream names the side as the results do.
    REQUIRE(fs::exists(dir / "b/championship"));
    const fs::directory_iterator files(dir / "b/championship");
    REQUIRE(files != fs::directory_iterator());
    std::ifstream stream(files->path());
    std::stringstream text;
    text << stream.rdbuf();
    CHECK_THAT(text.str(), Catch::Contains("\"home\": \"Harbour\""));
    CHECK_THAT(text.str(), !Catch::Contains("Harbour FC"));
    // The match both files give joins the rating history once.
    CHECK_THAT(mapped.out, Catch::Contains("1 championship results already in the "
                                           "international results counted once"));
}

TEST_CASE("fit counts a result two files give once", "[import]") {
    const auto dir = test::scratch_dir("fit_repeated");
    std::string rows = "date,home,away,home_goals,away_goals,neutral\n";
    const char* sides[] = {"North", "South", "East"};
    int n = 0;
    for (int month = 1; month <= 6; ++month)
        for (int i = 0; i < 3; ++i)
            for (int j = 0; j < 3; ++j)
                if (i != j) {
                    rows += fmt::format("2031-{:02}-{:02},{},{},{},{},0\n", month, 1 + 3 * i + j,
                                        sides[i], sides[j], (n * 7) % 4, (n * 5) % 3);
                    ++n;
                }
    write(dir / "r.csv", rows);
    // The cup's first match is the CSV's first, its sides the other way round.
    write(dir / "cup.json", R"({"name": "Cup", "rounds": [{"matches": [
      {"date": "2031-01-02", "team1": {"name": "South"}, "team2": {"name": "North"}, "score": {"ft": [0, 0]}},
      {"date": "2031-09-01", "team1": {"name": "North"}, "team2": {"name": "East"}, "score": {"ft": [2, 2]}}]}]})");
    const auto r = run(fmt::format("fit --results {} --results {} --min-matches 0 --out {}",
                                   (dir / "r.csv").string(), (dir / "cup.json").string(),
                                   (dir / "ratings.json").string()));
    INFO(r.out);
    REQUIRE(r.exit_code == 0);
    CHECK_THAT(r.out, Catch::Contains("1 already in an earlier file"));
    CHECK_THAT(r.out, Catch::Contains(fmt::format("on {} matches", n + 1)));
}

TEST_CASE(
    "import: an unreadable results row is an error naming file and line, or skipped when "
    "asked",
    "[import]") {
    const auto dir = invented_international(
        "import_bad_row", "2002-12-30,Harbour,Millbrook,1,x,Coast Cup,Port,Harbour,FALSE\n");
    const auto results = (dir / "results.csv").string();
    int lines = 0;
    {
        std::ifstream in(results);
        for (std::string line; std::getline(in, line);) ++lines;
    }
    const auto bad = run(fmt::format("import --international {} --coverage 0 --out {} --quiet",
                                     dir.string(), (dir / "a").string()));
    CHECK(bad.exit_code == 1);
    CHECK_THAT(bad.out, Catch::Contains(fmt::format("{}:{}: away_score 'x' is not a whole number",
                                                    results, lines)));
    CHECK_FALSE(fs::exists(dir / "a"));
    const auto skipped =
        run(fmt::format("import --international {} --coverage 0 --skip-bad-rows --out {} --quiet",
                        dir.string(), (dir / "b").string()));
    INFO(skipped.out);
    CHECK(skipped.exit_code == 0);
    CHECK_THAT(skipped.out, Catch::Contains("1 unreadable rows skipped"));
    const auto fit =
        run(fmt::format("fit --results {} --out {}", results, (dir / "r.json").string()));
    CHECK(fit.exit_code == 1);
    CHECK_THAT(fit.out, Catch::Contains(fmt::format("{}:{}", results, lines)));
}

TEST_CASE("fit --as-of and prior reproduce the priors import writes", "[import][open-data]") {
    const auto data = test::open_data_dir() / "international";
    const auto dir = test::scratch_dir("import_vs_prior");
    const auto imported = run(fmt::format(
        "import --international {} --from 2015-03-26 --to 2015-03-30 --form json --out {} --quiet",
        data.string(), (dir / "streams").string()));
    INFO(imported.out);
    REQUIRE(imported.exit_code == 0);
    std::ifstream stream(dir / "streams/international/2015.jsonl");
    liveprob::protocol::JsonFeedReader reader;
    int compared = 0;
    std::size_t number = 0;
    std::map<std::string, std::string> ratings_of_day;  // date -> ratings file
    for (std::string line; std::getline(stream, line) && compared < 6;) {
        const auto read = reader.read_line(line, ++number);
        REQUIRE(read.kind == liveprob::protocol::JsonLineKind::message);
        const auto* setup = std::get_if<liveprob::core::MatchSetup>(&read.message->body);
        if (!setup) continue;
        // The match id is 10,000,000 + the line of results.csv: its date and venue.
        const std::string row = line_of(
            data / "results.csv", static_cast<int>(read.message->header.match_id - 10'000'000));
        const std::string date = row.substr(0, 10);
        const bool neutral = row.ends_with("TRUE");
        auto& ratings = ratings_of_day[date];
        if (ratings.empty()) {
            ratings = (dir / (date + ".json")).string();
            const auto fitted =
                run(fmt::format("fit --results {} --as-of {} --half-life 730 --out {}",
                                (data / "results.csv").string(), date, ratings));
            INFO(fitted.out);
            REQUIRE(fitted.exit_code == 0);
        }
        const auto prior = run(fmt::format(
            "prior --ratings {} --home \"{}\" --away \"{}\" {} --setup-message --match-id 1",
            ratings, setup->home_name, setup->away_name, neutral ? "--neutral" : ""));
        INFO(prior.out);
        REQUIRE(prior.exit_code == 0);
        const auto again = reader.read_line(prior.out.substr(0, prior.out.find('\n')), 1);
        REQUIRE(again.kind == liveprob::protocol::JsonLineKind::message);
        const auto& p = std::get<liveprob::core::MatchSetup>(again.message->body).prior;
        REQUIRE(p);
        // Equal up to the fit's convergence (import warm-starts each fit from the day before).
        CHECK(p->home_goals == Approx(setup->prior->home_goals).epsilon(1e-9));
        CHECK(p->away_goals == Approx(setup->prior->away_goals).epsilon(1e-9));
        ++compared;
    }
    CHECK(compared == 6);
    CHECK(ratings_of_day.size() >= 2);
}

TEST_CASE("fit-inplay prints no standard error for a value it did not fit", "[import][open-data]") {
    // The international files before 2000: no shoot-out tally, so no conversion is fitted.
    const auto data = test::open_data_dir() / "international";
    const auto dir = test::scratch_dir("fit_inplay_unfitted");
    fs::create_directories(dir / "i");
    for (const char* name : {"results.csv", "goalscorers.csv", "shootouts.csv"}) {
        std::ifstream in(data / name);
        std::ofstream out(dir / "i" / name);
        std::string line;
        std::getline(in, line);
        out << line << "\n";
        while (std::getline(in, line))
            if (line.substr(0, 10) < "2000-01-01") out << line << "\n";
    }
    const auto r = run(fmt::format("fit-inplay --international {} --dispersion none --out {}",
                                   (dir / "i").string(), (dir / "p.json").string()));
    INFO(r.out);
    REQUIRE(r.exit_code == 0);
    auto row = [&](const std::string& key) {
        const auto at = r.out.find("\n" + key + " ");
        REQUIRE(at != std::string::npos);
        return r.out.substr(at + 1, r.out.find('\n', at + 1) - at - 1);
    };
    CHECK_THAT(row("shootout.conversion"), Catch::EndsWith("kept"));
    CHECK_THAT(row("kappa"), Catch::EndsWith("held"));
    CHECK_THAT(row("shootout.first_kicker_edge"), !Catch::EndsWith("kept"));
    std::ifstream file(dir / "p.json");
    std::stringstream text;
    text << file.rdbuf();
    const std::string json = text.str();
    const auto errors = json.substr(json.find("\"standard_errors\""));
    CHECK_THAT(errors, !Catch::Contains("shootout.conversion") && !Catch::Contains("\"kappa\""));
}

TEST_CASE("prior and calc agree on the largest expected goals", "[import]") {
    const auto dir = test::scratch_dir("prior_largest");
    // One side scoring a dozen a match: its expected goals lie far beyond the engine's limit.
    std::string rows = "date,home,away,home_goals,away_goals,neutral\n";
    for (int week = 0; week < 8; ++week) {
        rows += fmt::format("2031-{:02}-{:02},North,South,14,1,0\n", 1 + week, 3);
        rows += fmt::format("2031-{:02}-{:02},South,North,1,13,0\n", 1 + week, 10);
        rows += fmt::format("2031-{:02}-{:02},South,East,1,1,0\n", 1 + week, 17);
        rows += fmt::format("2031-{:02}-{:02},East,North,0,12,0\n", 1 + week, 24);
    }
    write(dir / "r.csv", rows);
    REQUIRE(run(fmt::format("fit --results {} --out {}", (dir / "r.csv").string(),
                            (dir / "r.json").string()))
                .exit_code == 0);
    const auto prior =
        run(fmt::format("prior --ratings {} --home North --away South --setup-message --match-id 3",
                        (dir / "r.json").string()));
    INFO(prior.out);
    REQUIRE(prior.exit_code == 0);
    CHECK_THAT(prior.out, Catch::Contains("held at"));
    liveprob::protocol::JsonFeedReader reader;
    const auto line = prior.out.substr(prior.out.find("{\"match\""));
    const auto read = reader.read_line(line.substr(0, line.find('\n')), 1);
    REQUIRE(read.kind == liveprob::protocol::JsonLineKind::message);
    const auto& p = std::get<liveprob::core::MatchSetup>(read.message->body).prior;
    REQUIRE(p);
    CHECK(p->home_goals == liveprob::core::kMaxPriorGoals);
    // calc takes what prior gives, and nothing more.
    CHECK(run(fmt::format("calc --prior {},{} --minute 10", p->home_goals, p->away_goals))
              .exit_code == 0);
    CHECK(run(fmt::format("calc --prior {},{} --minute 10", liveprob::core::kMaxPriorGoals + 0.01,
                          p->away_goals))
              .exit_code == 2);
}
