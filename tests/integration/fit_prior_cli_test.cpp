// `liveprob fit` and `liveprob prior` as a user runs them: the project's results CSV and the open
// datasets' formats in, the ratings file out (read back as `prior` reads it), the as-of cut,
// a bad row named by file and line, the prior and the match-setup line (read back by the JSON
// feed reader), an alias, and an unknown name answered with the closest known ones.
#include <catch2/catch.hpp>

#include <fmt/format.h>
#include <simdjson.h>

#include <cmath>
#include <fstream>
#include <set>
#include <string>

#include "liveprob/files/ratings_file.hpp"
#include "liveprob/fit/calendar.hpp"
#include "liveprob/fit/dixon_coles.hpp"
#include "liveprob/protocol/json_feed.hpp"
#include "test_env.hpp"

namespace test = liveprob::test;
namespace fit = liveprob::fit;

namespace {

// Runs the program with standard error folded into the captured output.
test::CommandResult liveprob_run(const std::string& args) {
    return test::run_command(fmt::format("{} {} 2>&1", test::liveprob_binary().string(), args));
}

std::string example(const char* name) {
    return (test::source_dir() / "tests/data" / name).string();
}

// The diagnostics the ratings file carries beside the ratings (the part `prior` does not read).
struct FileDiagnostics {
    double log_likelihood = 0, home_advantage_se = 0, rho_se = 0;
    std::int64_t matches = 0, iterations = 0;
    bool converged = false;
};

FileDiagnostics diagnostics_in(const std::string& path) {
    simdjson::dom::parser parser;
    simdjson::dom::element root;
    REQUIRE(parser.load(path).get(root) == simdjson::SUCCESS);
    FileDiagnostics d;
    REQUIRE(root["fit"]["log_likelihood"].get_double().get(d.log_likelihood) == simdjson::SUCCESS);
    REQUIRE(root["fit"]["matches"].get_int64().get(d.matches) == simdjson::SUCCESS);
    REQUIRE(root["fit"]["iterations"].get_int64().get(d.iterations) == simdjson::SUCCESS);
    REQUIRE(root["fit"]["converged"].get_bool().get(d.converged) == simdjson::SUCCESS);
    REQUIRE(root["home_advantage_se"].get_double().get(d.home_advantage_se) == simdjson::SUCCESS);
    REQUIRE(root["low_score_rho_se"].get_double().get(d.rho_se) == simdjson::SUCCESS);
    return d;
}

}  // namespace

TEST_CASE("fit on the project's results CSV writes a ratings file that prior reads") {
    const auto dir = test::scratch_dir("fit_cli_example");
    const auto ratings_path = (dir / "ratings.json").string();
    const auto run = liveprob_run(
        fmt::format("fit --results {} --out {}", example("results_example.csv"), ratings_path));
    INFO(run.out);
    REQUIRE(run.exit_code == 0);
    const fit::Ratings r = liveprob::files::load_ratings_file(ratings_path);
    const FileDiagnostics d = diagnostics_in(ratings_path);
    CHECK(d.converged);
    CHECK(d.iterations > 0);
    CHECK(d.log_likelihood < 0.0);
    CHECK(d.home_advantage_se > 0.0);
    // Every side of the CSV is rated, attack and defence each summing to zero.
    std::set<std::string> sides;
    std::ifstream csv(example("results_example.csv"));
    std::string line;
    std::getline(csv, line);
    int rows = 0;
    while (std::getline(csv, line)) {
        const auto a = line.find(','), b = line.find(',', a + 1), c = line.find(',', b + 1);
        sides.insert(line.substr(a + 1, b - a - 1));
        sides.insert(line.substr(b + 1, c - b - 1));
        ++rows;
    }
    CHECK(d.matches == rows);
    CHECK(r.teams.size() == sides.size());
    double attack = 0.0, defence = 0.0;
    for (const auto& t : r.teams) {
        attack += t.attack;
        defence += t.defence;
        CHECK(sides.count(t.name) == 1);
    }
    CHECK(std::abs(attack) < 1e-9);
    CHECK(std::abs(defence) < 1e-9);

    // prior: a feed name through the alias file, and the setup line the feed reader accepts.
    const auto prior =
        liveprob_run(fmt::format("prior --ratings {} --home \"Harbour T.\" --away \"Hill Rovers\" "
                                 "--aliases {} --setup-message --match-id 77",
                                 ratings_path, example("aliases_example.csv")));
    INFO(prior.out);
    REQUIRE(prior.exit_code == 0);
    liveprob::protocol::JsonFeedReader reader;
    const auto read = reader.read_line(prior.out.substr(0, prior.out.find('\n')), 1);
    REQUIRE(read.kind == liveprob::protocol::JsonLineKind::message);
    CHECK(read.message->header.match_id == 77);
    const auto& setup = std::get<liveprob::core::MatchSetup>(read.message->body);
    REQUIRE(setup.prior);
    const auto expected =
        fit::expected_goals(r, *r.find("Harbour Town"), *r.find("Hill Rovers"), false);
    CHECK(setup.prior->home_goals == Approx(expected.home).epsilon(1e-12));
    CHECK(setup.prior->away_goals == Approx(expected.away).epsilon(1e-12));

    // An unknown name is an error listing the closest known names.
    const auto unknown = liveprob_run(fmt::format(
        "prior --ratings {} --home \"Harbor Town\" --away \"Hill Rovers\"", ratings_path));
    CHECK(unknown.exit_code == 1);
    CHECK_THAT(unknown.out, Catch::Contains("Harbour Town"));
}

TEST_CASE("fit: the as-of cut, and a malformed row named by file and line") {
    const auto dir = test::scratch_dir("fit_cli_errors");
    const auto before_all =
        liveprob_run(fmt::format("fit --results {} --as-of 2000-01-01 --out {}",
                                 example("results_example.csv"), (dir / "r.json").string()));
    CHECK(before_all.exit_code == 1);
    CHECK_THAT(before_all.out, Catch::Contains("as-of"));

    const auto bad = dir / "bad.csv";
    std::ofstream(bad) << "date,home,away,home_goals,away_goals,neutral\n"
                       << "2031-08-09,North,South,2,1,0\n"
                       << "2031-08-16,South,North,two,1,0\n";
    const auto run = liveprob_run(
        fmt::format("fit --results {} --out {}", bad.string(), (dir / "r.json").string()));
    CHECK(run.exit_code == 1);
    CHECK_THAT(run.out, Catch::Contains("bad.csv") && Catch::Contains("3"));
    CHECK_FALSE(std::filesystem::exists(dir / "r.json"));
}

TEST_CASE(
    "fit reads the open datasets' formats: a league file and the international results as of a "
    "date") {
    const auto data = test::open_data_dir();
    const auto dir = test::scratch_dir("fit_cli_open");
    const auto league = liveprob_run(
        fmt::format("fit --results {} --half-life 240 --low-score-correction --out {}",
                    (data / "leagues/2015-16/de.1.json").string(), (dir / "league.json").string()));
    INFO(league.out);
    REQUIRE(league.exit_code == 0);
    const fit::Ratings l = liveprob::files::load_ratings_file((dir / "league.json").string());
    const FileDiagnostics ld = diagnostics_in((dir / "league.json").string());
    CHECK(l.teams.size() == 18);
    CHECK(ld.matches == 306);
    CHECK(ld.converged);
    CHECK(ld.rho_se > 0.0);
    CHECK(l.xi == Approx(std::log(2.0) / 240.0));

    const auto international = liveprob_run(fmt::format(
        "fit --results {} --as-of 2010-06-11 --half-life 730 --out {}",
        (data / "international/results.csv").string(), (dir / "international.json").string()));
    INFO(international.out);
    REQUIRE(international.exit_code == 0);
    const fit::Ratings i =
        liveprob::files::load_ratings_file((dir / "international.json").string());
    REQUIRE(i.as_of_day);
    CHECK(*i.as_of_day == *fit::parse_iso_date("2010-06-11"));
    CHECK(diagnostics_in((dir / "international.json").string()).converged);
    CHECK(i.teams.size() > 200);
}
