// The acceptance backtest: walk-forward on the open international data. Everything the model
// uses is fitted on data before a cut (1 January 2010): `fit-inplay` on copies of results.csv,
// goalscorers.csv and shootouts.csv holding only the rows before it; the priors are walk-forward
// (`import`: ratings fitted on the results strictly before each match's day). The years after
// the cut that the project holds (2010-2015, every match with complete goal minutes) are
// replayed (`replay --elo-data`) beside independent Poisson on the same priors and the naive Elo
// reference (whose ratings, goals map and goal-minute histogram also use only earlier data).
//
// The table is printed whatever the outcome, with each of the targets per bucket:
//   (a) the model's RPS at least 1% below the naive Elo reference's,
//   (b) below independent Poisson's on the same priors,
//   (c) ECE at most 0.02,
// and what is asserted: what holds for the model on main, checked so that a change that loses it
// fails. The in-play fit and the import run with their defaults: the choices the walk-forward
// backtests at three cuts picked (replay-demo/README.md, "Choices made out of sample"). The rest
// is printed with its figures as not met (see replay-demo/README.md, "The acceptance backtest",
// for why). Data: the open international dataset (its licence beside
// it).
#include <simdjson.h>
#include <catch2/catch.hpp>

#include <chrono>
#include <fstream>
#include <iostream>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "report_comparison.hpp"
#include "test_env.hpp"

namespace {

using liveprob::test::read_comparison;
const auto cell = liveprob::test::percent_cell;

constexpr const char* kCut = "2010-01-01";

double run_step(const std::string& what, const std::string& command) {
    const auto start = std::chrono::steady_clock::now();
    const auto result = liveprob::test::run_command(command);
    const double seconds =
        std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    std::cout << fmt::format("-- {} ({:.1f} s): {}\n", what, seconds, command) << std::flush;
    INFO(command << "\n" << result.out);
    REQUIRE(result.exit_code == 0);
    return seconds;
}

// The rows of a CSV file dated before the cut (the date is every open file's first column).
void copy_before_cut(const std::filesystem::path& from, const std::filesystem::path& to) {
    std::ifstream in(from);
    std::ofstream out(to);
    std::string line;
    bool header = true;
    while (std::getline(in, line)) {
        if (header || line.substr(0, 10) < kCut) out << line << "\n";
        header = false;
    }
}

}  // namespace

TEST_CASE(
    "walk-forward acceptance: the model against naive Elo and independent Poisson on "
    "2010-2015, fitted before 2010",
    "[backtest][open-data]") {
    namespace fs = std::filesystem;
    const auto data = liveprob::test::open_data_dir() / "international";
    const auto dir = liveprob::test::scratch_dir("backtest-walk-forward");
    const std::string bin = liveprob::test::liveprob_binary().string();
    const auto before = dir / "before-cut";
    fs::create_directories(before);
    for (const char* name : {"results.csv", "goalscorers.csv", "shootouts.csv"})
        copy_before_cut(data / name, before / name);
    const auto params = dir / "params.json", streams = dir / "streams", report = dir / "report";

    double total = 0;
    total += run_step("in-play parameters fitted before the cut",
                      fmt::format("{} fit-inplay --international {} --out {}", bin, before.string(),
                                  params.string()));
    total += run_step("import of the matches after the cut, walk-forward priors",
                      fmt::format("{} import --international {} --out {} --from {} --quiet", bin,
                                  data.string(), streams.string(), kCut));
    total +=
        run_step("replay beside the references",
                 fmt::format("{} replay {} --report {} --params {} --elo-data {} --quiet", bin,
                             streams.string(), report.string(), params.string(), data.string()));
    std::cout << fmt::format("-- whole backtest: {:.1f} s\n", total);

    const auto buckets = read_comparison(report / "report.json");
    REQUIRE(buckets.size() == 8);
    std::cout << fmt::format(
        "RPS relative difference in % [paired bootstrap 95% interval, seed 20261202, 1000 "
        "resamples]; negative: the model is better\n{:>4} {:>5} {:>8} {:>8} {:>8} {:>24} {:>24} "
        "{:>6} {:>13}  targets: (a) <= -1% vs Elo (b) < 0 vs IP (c) ECE <= 0.02\n",
        "min", "n", "model", "indep.P", "Elo", "model vs Elo", "model vs indep. Poisson", "ECE",
        "calibrated");
    for (const auto& b : buckets) {
        std::cout << fmt::format(
            "{:>4} {:>5} {:>8.5f} {:>8.5f} {:>8.5f} {:>24} {:>24} {:>6.4f} {:.4f}/{:.4f}  "
            "(a) {} (b) {} (c) {}\n",
            b.label, b.n, b.rps_model, b.rps_ip, b.rps_elo, cell(b.vs_elo), cell(b.vs_ip), b.ece,
            b.ece_calibrated_mean, b.ece_calibrated_p95,
            b.vs_elo.relative <= -0.01 ? (b.vs_elo.high < 0 ? "met" : "met (interval holds 0)")
                                       : "NOT MET",
            b.vs_ip.relative < 0 ? (b.vs_ip.high < 0 ? "met" : "met (interval holds 0)")
                                 : "NOT MET",
            b.ece <= 0.02 ? "met" : "NOT MET");
    }
    std::cout << std::flush;

    for (const auto& b : buckets) {
        INFO(fmt::format("bucket {}: model vs Elo {}, vs independent Poisson {}, ECE {:.4f}",
                         b.label, cell(b.vs_elo), cell(b.vs_ip), b.ece));
        CHECK(b.n == 2093);  // every match of 2010-2015 with complete goal minutes
        // The references are themselves what they claim: both far better than a coin from 15'.
        CHECK(b.rps_elo < 0.2);
    }
    // What holds for the model on main (see the file comment; measured 2026-12-03): at kick-off
    // and 15' the model beats the naive Elo reference by more than 1%, with the whole interval
    // below 0; at 90+ it is better than Elo with the interval below 0; from 45' on its ECE is at
    // most 0.02. With the default in-play fit (score-state multipliers held at 1, κ = ∞: the
    // choices made out of sample) and no red card in these files, its forecasts are independent
    // Poisson's on the same priors and profile, equal to the engine's rounding.
    for (std::size_t i : {0u, 1u}) {
        CHECK(buckets[i].vs_elo.relative <= -0.01);
        CHECK(buckets[i].vs_elo.high < 0.0);
    }
    CHECK(buckets[7].vs_elo.high < 0.0);
    for (const auto& b : buckets) CHECK(std::abs(b.rps_model - b.rps_ip) < 1e-9);
    for (std::size_t i = 3; i < buckets.size(); ++i) CHECK(buckets[i].ece <= 0.02);
}
