// `liveprob replay` as the harness that compares forecasters, run as a real program on the demo
// league's streams: a further configuration (--variant) is scored on the same matches beside
// the model and the references, the report carries paired intervals with the seed, the ECE of a
// perfectly calibrated forecaster, breakdowns, the per-match table (matches.csv) and the inputs'
// SHA-256 (checked against Python's hashlib), the same seed gives the same report, and a replay
// that scores nothing exits 1.
#include <simdjson.h>
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <fstream>
#include <sstream>

#include "test_env.hpp"

namespace test = liveprob::test;

namespace {

std::string read_text(const std::filesystem::path& path) {
    std::ifstream in(path);
    std::stringstream text;
    text << in.rdbuf();
    return text.str();
}

}  // namespace

TEST_CASE("replay compares a variant with the model and the references on the same matches",
          "[replay][sockets]") {
    const auto dir = test::scratch_dir("replay-compare");
    const std::string bin = test::liveprob_binary().string();
    REQUIRE(test::run_command(
                fmt::format("{} simulate --out {} --seed 4", bin, (dir / "demo").string()))
                .exit_code == 0);
    // A variant without any in-play effect and a plain Poisson strength.
    const auto variant = dir / "plain.json";
    std::ofstream(variant) << R"({"kind":"liveprob-model-params","version":1,)"
                           << R"("score_state":{"leading":1,"level":1,"trailing":1}})";
    const auto league = dir / "demo" / "league";
    auto replay = [&](const std::string& report) {
        return test::run_command(fmt::format(
            "{} replay {} --report {} --variant plain={} --seed 99 --resamples 300 --quiet", bin,
            league.string(), (dir / report).string(), variant.string()));
    };
    const auto first = replay("report");
    INFO(first.out);
    REQUIRE(first.exit_code == 0);
    CHECK(first.out.find("seed 99") != std::string::npos);

    simdjson::dom::parser parser;
    simdjson::dom::element root;
    REQUIRE(parser.load((dir / "report" / "report.json").string()).get(root) == simdjson::SUCCESS);
    std::uint64_t scored = 0, seed = 0, matches = 0;
    REQUIRE(root["matches"]["scored"].get_uint64().get(scored) == simdjson::SUCCESS);
    REQUIRE(root["comparison"]["seed"].get_uint64().get(seed) == simdjson::SUCCESS);
    REQUIRE(root["comparison"]["matches"].get_uint64().get(matches) == simdjson::SUCCESS);
    CHECK(seed == 99);
    CHECK(matches == scored);
    CHECK(scored > 300);
    simdjson::dom::array buckets;
    REQUIRE(root["comparison"]["buckets"].get_array().get(buckets) == simdjson::SUCCESS);
    CHECK(buckets.size() == 8);
    for (simdjson::dom::element b : buckets) {
        // The variant is paired with the model on every scored match; its interval surrounds
        // its point estimate; the calibrated ECE is there, below its 95th percentile.
        std::uint64_t n = 0;
        double low = 0, high = 0, relative = 0, mean = 0, p95 = 0;
        REQUIRE(b["model_against"]["plain"]["n"].get_uint64().get(n) == simdjson::SUCCESS);
        REQUIRE(b["model_against"]["plain"]["relative_low"].get_double().get(low) ==
                simdjson::SUCCESS);
        REQUIRE(b["model_against"]["plain"]["relative_high"].get_double().get(high) ==
                simdjson::SUCCESS);
        REQUIRE(b["model_against"]["plain"]["relative"].get_double().get(relative) ==
                simdjson::SUCCESS);
        REQUIRE(b["scores"]["model"]["ece_calibrated_mean"].get_double().get(mean) ==
                simdjson::SUCCESS);
        REQUIRE(b["scores"]["model"]["ece_calibrated_p95"].get_double().get(p95) ==
                simdjson::SUCCESS);
        CHECK(n == scored);
        CHECK(low <= relative);
        CHECK(relative <= high);
        CHECK(mean > 0.0);
        CHECK(mean <= p95);
        REQUIRE(b["scores"]["independent_poisson"]["n"].get_uint64().get(n) == simdjson::SUCCESS);
        CHECK(n == scored);
    }
    simdjson::dom::array years;
    REQUIRE(root["comparison"]["by_year"].get_array().get(years) == simdjson::SUCCESS);
    CHECK(years.size() >= 1);

    // The per-match table: a header and one row per scored match.
    const std::string csv = read_text(dir / "report" / "matches.csv");
    CHECK(static_cast<std::uint64_t>(std::count(csv.begin(), csv.end(), '\n')) == scored + 1);
    CHECK(csv.rfind("match_id,date,competition,home,away,home_goals,away_goals,result,", 0) == 0);
    CHECK(csv.find("plain@90+:away") != std::string::npos);

    // Fingerprints: each input file's SHA-256, as hashlib computes it.
    simdjson::dom::array files;
    REQUIRE(root["inputs"]["files"].get_array().get(files) == simdjson::SUCCESS);
    std::string paths, hashes;
    for (simdjson::dom::element f : files) {
        std::string_view path, sha;
        REQUIRE(f["path"].get_string().get(path) == simdjson::SUCCESS);
        REQUIRE(f["sha256"].get_string().get(sha) == simdjson::SUCCESS);
        paths += " " + std::string(path);
        hashes += std::string(sha) + "\n";
    }
    CHECK(files.size() == 1 + 380);  // the variant's parameters and the league's streams
    const auto python = test::python_sha256(paths);
    REQUIRE(python.exit_code == 0);
    CHECK(python.out == hashes);

    // The same seed, the same report.
    REQUIRE(replay("again").exit_code == 0);
    CHECK(read_text(dir / "again" / "report.json").find(R"("comparison")") != std::string::npos);
    CHECK(read_text(dir / "again" / "report.json")
              .substr(read_text(dir / "again" / "report.json").find(R"("comparison")")) ==
          read_text(dir / "report" / "report.json")
              .substr(read_text(dir / "report" / "report.json").find(R"("comparison")")));
}

TEST_CASE("replay exits 1 when it scored nothing", "[replay][sockets]") {
    const auto dir = test::scratch_dir("replay-nothing");
    const std::string bin = test::liveprob_binary().string();
    // A setup and a kick-off, never finished: nothing to score.
    const auto stream = dir / "unfinished.jsonl";
    REQUIRE(test::run_command(fmt::format("{} simulate --out {} --seed 4 --form json", bin,
                                          (dir / "demo").string()))
                .exit_code == 0);
    std::ifstream in(
        dir / "demo" / "league" /
        std::filesystem::directory_iterator(dir / "demo" / "league")->path().filename());
    std::ofstream out(stream);
    std::string line;
    for (int i = 0; i < 3 && std::getline(in, line); ++i) out << line << "\n";
    out.close();
    const auto run = test::run_command(fmt::format("{} replay {} --report {} --quiet 2>&1", bin,
                                                   stream.string(), (dir / "report").string()));
    CHECK(run.exit_code == 1);
    CHECK(run.out.find("no match was scored") != std::string::npos);
}
