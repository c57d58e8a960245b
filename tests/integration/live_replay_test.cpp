// `liveprob replay --live` against a real `serve` on loopback, all separate processes: the same
// demo streams (league matches, cup ties with extra time and shoot-outs, clock stoppages,
// cancelled goals, red cards) replayed in process and over the sockets give the same scores,
// because the streams carry a clock reading at every bucket minute; serve's journal afterwards
// holds exactly the messages sent, in the recorded-stream format; and a paced run never sends
// faster than the chosen speed.
#include <simdjson.h>
#include <catch2/catch.hpp>

#include <algorithm>
#include <iostream>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "child_process.hpp"
#include "liveprob/backtest/backtest.hpp"
#include "liveprob/backtest/recorded_stream.hpp"
#include "liveprob/demo/demo_season.hpp"
#include "test_env.hpp"

using namespace liveprob;
using namespace liveprob::scoring;

using namespace liveprob::core;

namespace {

struct Scores {
    std::uint64_t n = 0;
    std::array<double, 3> rps{}, brier{}, log_loss{};
    double ece = 0;
    std::vector<std::uint64_t> bin_counts;  // the model's calibration bins, all outcomes
};

std::vector<Scores> read_scores(const std::filesystem::path& report) {
    simdjson::dom::parser parser;
    simdjson::dom::element root;
    REQUIRE(parser.load((report / "report.json").string()).get(root) == simdjson::SUCCESS);
    simdjson::dom::array buckets;
    REQUIRE(root["buckets"].get_array().get(buckets) == simdjson::SUCCESS);
    std::vector<Scores> out;
    for (simdjson::dom::element b : buckets) {
        Scores s;
        REQUIRE(b["n"].get_uint64().get(s.n) == simdjson::SUCCESS);
        const char* names[] = {"model", "fixed_prior", "uniform_timing_no_state"};
        for (std::size_t f = 0; f < 3; ++f) {
            REQUIRE(b[names[f]]["rps"].get_double().get(s.rps[f]) == simdjson::SUCCESS);
            REQUIRE(b[names[f]]["brier"].get_double().get(s.brier[f]) == simdjson::SUCCESS);
            REQUIRE(b[names[f]]["log_loss"].get_double().get(s.log_loss[f]) == simdjson::SUCCESS);
        }
        REQUIRE(b["model"]["ece"].get_double().get(s.ece) == simdjson::SUCCESS);
        for (const char* outcome : {"home", "draw", "away"}) {
            simdjson::dom::array bins;
            REQUIRE(b["model"]["calibration"][outcome].get_array().get(bins) == simdjson::SUCCESS);
            for (simdjson::dom::element bin : bins) {
                std::uint64_t n = 0;
                REQUIRE(bin["n"].get_uint64().get(n) == simdjson::SUCCESS);
                s.bin_counts.push_back(n);
            }
        }
        out.push_back(std::move(s));
    }
    return out;
}

liveprob::test::CommandResult run(const std::string& command) {
    auto result = liveprob::test::run_command(command + " 2>&1");
    INFO(command << "\n" << result.out);
    REQUIRE(result.exit_code == 0);
    return result;
}

}  // namespace

TEST_CASE(
    "replay --live through serve scores what a subscriber received: equal to the in-process replay",
    "[replay][live][sockets]") {
    const auto dir = liveprob::test::scratch_dir("live-replay");
    const auto season = demo::simulate_demo_season(demo::make_demo_league(11), 11);
    std::filesystem::create_directories(dir / "streams");
    // The first two rounds of the league (20 matches, interleaved by kick-off) and the whole cup.
    for (std::size_t i = 0; i < 20; ++i) {
        backtest::write_stream(dir / "streams" / fmt::format("league-{}.stream", i),
                               season.league[i].messages, backtest::StreamForm::frames);
    }
    for (std::size_t i = 0; i < season.cup.size(); ++i) {
        backtest::write_stream(dir / "streams" / fmt::format("cup-{}.jsonl", i),
                               season.cup[i].messages, backtest::StreamForm::json_lines);
    }
    const std::string bin = liveprob::test::liveprob_binary().string();
    liveprob::test::ChildProcess serve(
        {bin, "serve", "--ingest", "tcp://127.0.0.1:*", "--publish", "tcp://127.0.0.1:*",
         "--snapshot", "tcp://127.0.0.1:*", "--endpoints-file", (dir / "serve.endpoints").string(),
         "--journal", (dir / "journal.lpj").string(), "--tick-ms", "50", "--log-level", "warn"},
        dir / "serve.log");
    liveprob::test::wait_for_file(dir / "serve.endpoints");

    const auto fast = run(fmt::format("{} replay {} --report {} --quiet", bin,
                                      (dir / "streams").string(), (dir / "fast").string()));
    const auto live = run(fmt::format("{} replay {} --report {} --quiet --live --endpoints {}", bin,
                                      (dir / "streams").string(), (dir / "live").string(),
                                      (dir / "serve.endpoints").string()));
    std::cout << fast.out << live.out;
    CHECK(live.out.find(" 0 missed, 0 undecodable") != std::string::npos);
    CHECK(live.out.find("largest difference from the in-process forecasts 0)") !=
          std::string::npos);

    const auto a = read_scores(dir / "fast"), b = read_scores(dir / "live");
    REQUIRE(a.size() == b.size());
    for (std::size_t k = 0; k < a.size(); ++k) {
        INFO("bucket " << k);
        CHECK(a[k].n > 20);
        CHECK(b[k].n == a[k].n);
        for (std::size_t f = 0; f < 3; ++f) {
            CHECK(b[k].rps[f] == Approx(a[k].rps[f]).margin(1e-12));
            CHECK(b[k].brier[f] == Approx(a[k].brier[f]).margin(1e-12));
            CHECK(b[k].log_loss[f] == Approx(a[k].log_loss[f]).margin(1e-12));
        }
        CHECK(b[k].ece == Approx(a[k].ece).margin(1e-12));
        CHECK(b[k].bin_counts == a[k].bin_counts);
    }

    // The journal is a recorded stream: it holds every message sent, in the order sent.
    serve.stop();
    const auto journal = backtest::read_stream(dir / "journal.lpj");
    CHECK(journal.bad_records == 0);
    std::size_t expected = 0;
    for (std::size_t i = 0; i < 20; ++i) expected += season.league[i].messages.size();
    for (const auto& m : season.cup) expected += m.messages.size();
    CHECK(journal.messages.size() == expected);
    std::vector<InboundMessage> recorded;
    for (const auto& file : std::filesystem::directory_iterator(dir / "streams")) {
        const auto contents = backtest::read_stream(file.path());
        recorded.insert(recorded.end(), contents.messages.begin(), contents.messages.end());
    }
    auto by_time = [](const InboundMessage& x, const InboundMessage& y) {
        return std::tie(x.header.source_time_us, x.header.match_id, x.header.source_seq) <
               std::tie(y.header.source_time_us, y.header.match_id, y.header.source_seq);
    };
    auto journal_sorted = journal.messages;
    std::sort(recorded.begin(), recorded.end(), by_time);
    std::sort(journal_sorted.begin(), journal_sorted.end(), by_time);
    CHECK(journal_sorted == recorded);
    CHECK(std::is_sorted(journal.messages.begin(), journal.messages.end(),
                         [](const InboundMessage& x, const InboundMessage& y) {
                             return x.header.source_time_us < y.header.source_time_us;
                         }));
}

TEST_CASE("replay --live at a chosen speed is paced by the streams' timestamps",
          "[replay][live][sockets]") {
    const auto dir = liveprob::test::scratch_dir("live-replay-paced");
    const auto season = demo::simulate_demo_season(demo::make_demo_league(12), 12);
    std::filesystem::create_directories(dir / "streams");
    // One league round: ten matches played at the same time.
    std::int64_t first = INT64_MAX, last = INT64_MIN;
    for (std::size_t i = 0; i < 10; ++i) {
        const auto& messages = season.league[i].messages;
        backtest::write_stream(dir / "streams" / fmt::format("m{}.stream", i), messages,
                               backtest::StreamForm::frames);
        first = std::min(first, messages.front().header.source_time_us);
        last = std::max(last, messages.back().header.source_time_us);
    }
    const std::string bin = liveprob::test::liveprob_binary().string();
    liveprob::test::ChildProcess serve(
        {bin, "serve", "--ingest", "tcp://127.0.0.1:*", "--publish", "tcp://127.0.0.1:*",
         "--snapshot", "tcp://127.0.0.1:*", "--endpoints-file", (dir / "serve.endpoints").string(),
         "--log-level", "warn"},
        dir / "serve.log");
    const auto endpoints = liveprob::test::wait_for_file(dir / "serve.endpoints");
    const double speed = 4000.0;
    const auto live = run(
        fmt::format("{} replay {} --report {} --quiet --live --ingest {} --publish {} --speed {}",
                    bin, (dir / "streams").string(), (dir / "live").string(),
                    liveprob::test::key_value(endpoints, "ingest"),
                    liveprob::test::key_value(endpoints, "publish"), speed));
    std::cout << live.out;
    // "N messages sent in S s": never faster than the recording at this speed.
    const auto at = live.out.find(" messages sent in ");
    REQUIRE(at != std::string::npos);
    const double seconds = std::stod(live.out.substr(at + 18));
    CHECK(seconds >= static_cast<double>(last - first) / 1e6 / speed * 0.999);
    CHECK(read_scores(dir / "live").front().n == 10);
    // The timer's updates between messages lag the sped-up clock; the readings at the bucket
    // minutes still come from the feed's clock readings there, as in process.
    CHECK(live.out.find("largest difference from the in-process forecasts 0)") !=
          std::string::npos);
}

TEST_CASE("replay --live against an endpoint where nothing answers fails with a clear error",
          "[replay][live][sockets]") {
    const auto dir = liveprob::test::scratch_dir("live-replay-nothing");
    const auto season = demo::simulate_demo_season(demo::make_demo_league(13), 13);
    backtest::write_stream(dir / "m.stream", season.league[0].messages,
                           backtest::StreamForm::frames);
    const std::string bin = liveprob::test::liveprob_binary().string();
    // Ports nobody listens on (serve not started): the setup is queued, no update ever comes.
    const auto result = liveprob::test::run_command(
        fmt::format("{} replay {} --report {} --quiet --live --ingest tcp://127.0.0.1:1 --publish "
                    "tcp://127.0.0.1:2 "
                    "--wait-ms 1000 2>&1",
                    bin, (dir / "m.stream").string(), (dir / "live").string()));
    CHECK(result.exit_code == 1);
    CHECK(result.out.find("no update for match") != std::string::npos);
}
