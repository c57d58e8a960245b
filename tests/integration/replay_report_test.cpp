// The replay on a small demo stream written to real files: the report's JSON carries every
// bucket with n and each score per forecaster, and the result does not depend on the threads.
#include <catch2/catch.hpp>

#include <fstream>
#include <sstream>

#include <fmt/format.h>

#include "liveprob/backtest/backtest.hpp"
#include "liveprob/backtest/recorded_stream.hpp"
#include "liveprob/demo/demo_season.hpp"
#include "liveprob/report/report_html.hpp"
#include "liveprob/report/report_json.hpp"
#include "test_env.hpp"

using namespace liveprob;

using namespace liveprob::core;
using namespace liveprob::backtest;
using namespace liveprob::demo;
using namespace liveprob::report;
using namespace liveprob::scoring;

TEST_CASE("replay of demo streams from files gives the same report on 1 and 3 threads",
          "[replay][threads]") {
    const auto league = make_demo_league(5);
    const auto season = simulate_demo_season(league, 5);
    const auto dir = liveprob::test::scratch_dir("replay-report");
    std::vector<InboundMessage> all;
    for (std::size_t i = 0; i < 40; ++i) {
        const auto path = dir / fmt::format("m{}.{}", i, i % 2 ? "jsonl" : "stream");
        write_stream(path, season.league[i].messages,
                     i % 2 ? StreamForm::json_lines : StreamForm::frames);
        auto contents = read_stream(path);
        CHECK(contents.bad_records == 0);
        CHECK(contents.messages == season.league[i].messages);  // both forms round-trip
        all.insert(all.end(), contents.messages.begin(), contents.messages.end());
    }
    const auto matches = group_by_match(all);
    REQUIRE(matches.size() == 40);
    BacktestOptions one;
    one.threads = 1;
    BacktestOptions three = one;
    three.threads = 3;
    const auto a = run_backtest(matches, one);
    const auto b = run_backtest(matches, three);
    CHECK(report_json(a) == report_json(b));

    const std::uint64_t finished = 40 - a.abandoned;
    CHECK(a.scored == finished);
    CHECK(a.rejected == 0);
    for (int k = 0; k < kBuckets; ++k) {
        // Every finished match reaches every bucket, 90:00 included.
        CHECK(a.at(k, Forecaster::model).count() == finished);
        CHECK(a.at(k, Forecaster::fixed_prior).mean_rps() ==
              Approx(a.at(0, Forecaster::model).mean_rps()));
    }
    // Late in the match the live model knows far more than the kick-off forecast.
    CHECK(a.at(6, Forecaster::model).mean_rps() < a.at(6, Forecaster::fixed_prior).mean_rps());

    write_report(dir / "report", a, {});
    std::ifstream json(dir / "report" / "report.json");
    std::stringstream text;
    text << json.rdbuf();
    for (const char* key : {"\"buckets\"", "\"label\":\"90+\"", "\"fixed_prior\"",
                            "\"uniform_timing_no_state\"", "\"calibration\"", "\"observed_rate\"",
                            "\"rps\"", "\"log_loss\"", "\"brier\"", "\"ece\""}) {
        CHECK(text.str().find(key) != std::string::npos);
    }
    CHECK(std::filesystem::file_size(dir / "report" / "index.html") > 1000);
    std::ifstream html(dir / "report" / "index.html");
    std::stringstream page;
    page << html.rdbuf();
    // Readers see words, and every chart has a y-axis title or percentages.
    for (const char* words : {"flat timing, no state effects", "pre-match forecast, held",
                              "mean RPS", "observed", "100%", "gambling advertising"}) {
        INFO(words);
        CHECK(page.str().find(words) != std::string::npos);
    }
    CHECK(page.str().find("<small>uniform_timing_no_state</small>") == std::string::npos);
}
