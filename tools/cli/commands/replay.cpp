// `liveprob replay STREAMS... --report DIR`: replays recorded streams and writes the calibration
// report (index.html and report.json), printing the score table. Fast mode runs the engine in
// process on all cores; --live sends the streams over real sockets to a running `serve` at a
// chosen speed and scores what a subscriber received
// (replay-demo/live/include/liveprob/live/live_replay.hpp).
#include <chrono>
#include <filesystem>
#include <iostream>
#include <memory>
#include <thread>

#include <fmt/format.h>
#include <fmt/ranges.h>

#include "command_registry.hpp"
#include "liveprob/backtest/backtest.hpp"
#include "liveprob/files/endpoints_file.hpp"
#include "liveprob/files/params_file.hpp"
#include "liveprob/live/live_replay.hpp"
#include "liveprob/report/report_html.hpp"
#include "progress_bar.hpp"

namespace liveprob::cli {
namespace {

struct ReplayOptions {
    std::vector<std::string> streams;
    std::string report_dir;
    std::string params_file;
    unsigned threads = 0;
    std::size_t timelines = 12;
    bool every_event = false;
    bool quiet = false;
    // --live
    bool live = false;
    std::vector<std::string> ingest;
    std::string publish;
    std::string endpoints_file;
    double speed = 0.0;
    int wait_ms = 10'000;
    std::string server_key, client_key;
};

// Every stream file named, directories walked (their files in name order).
std::vector<std::filesystem::path> stream_files(const std::vector<std::string>& args) {
    std::vector<std::filesystem::path> files;
    for (const auto& arg : args) {
        if (std::filesystem::is_directory(arg)) {
            std::vector<std::filesystem::path> inside;
            for (const auto& entry : std::filesystem::recursive_directory_iterator(arg))
                if (entry.is_regular_file()) inside.push_back(entry.path());
            std::sort(inside.begin(), inside.end());
            files.insert(files.end(), inside.begin(), inside.end());
        } else if (std::filesystem::exists(arg)) {
            files.emplace_back(arg);
        } else {
            throw UsageError("no such stream file or directory: " + arg);
        }
    }
    return files;
}

struct LoadedStreams {
    std::vector<backtest::MatchMessages> matches;
    std::size_t files = 0;
    std::uint64_t bad_records = 0;
};

LoadedStreams load_streams(const std::vector<std::string>& args) {
    LoadedStreams out;
    std::vector<core::InboundMessage> all;
    const auto files = stream_files(args);
    for (const auto& file : files) {
        auto contents = backtest::read_stream(file);
        if (contents.bad_records) {
            out.bad_records += contents.bad_records;
            std::cerr << "liveprob replay: " << contents.bad_records
                      << " bad record(s) skipped; first: " << contents.first_problem << "\n";
        }
        all.insert(all.end(), std::make_move_iterator(contents.messages.begin()),
                   std::make_move_iterator(contents.messages.end()));
    }
    out.files = files.size();
    out.matches = backtest::group_by_match(all);
    return out;
}

// One endpoint from serve's endpoints file.
std::string endpoint_from_file(const std::string& path, const std::string& name) {
    const auto endpoints = files::read_endpoints_file(path);
    const auto it = endpoints.find(name);
    if (it == endpoints.end()) throw UsageError(fmt::format("{}: no {}= line", path, name));
    return it->second;
}

void print_table(const backtest::BacktestResult& result) {
    using backtest::Forecaster;
    std::cout << fmt::format("{:>5} {:>6} {:>9} {:>9} {:>9} {:>8}\n", "min", "n", "rps", "fixed",
                             "uniform", "ece");
    for (int b = 0; b < scoring::kBuckets; ++b) {
        std::cout << fmt::format(
            "{:>5} {:>6} {:>9.5f} {:>9.5f} {:>9.5f} {:>8.4f}\n", scoring::bucket_label(b),
            result.at(b, backtest::Forecaster::model).count(),
            result.at(b, backtest::Forecaster::model).mean_rps(),
            result.at(b, backtest::Forecaster::fixed_prior).mean_rps(),
            result.at(b, backtest::Forecaster::uniform_timing_no_state).mean_rps(),
            result.at(b, backtest::Forecaster::model).calibration().expected_calibration_error());
    }
}

live::LiveReplayOptions live_options(const ReplayOptions& o) {
    live::LiveReplayOptions live;
    live.ingest = o.ingest;
    live.publish = o.publish;
    if (!o.endpoints_file.empty()) {
        if (live.ingest.empty()) live.ingest = {endpoint_from_file(o.endpoints_file, "ingest")};
        if (live.publish.empty()) live.publish = endpoint_from_file(o.endpoints_file, "publish");
    }
    if (live.ingest.empty() || live.publish.empty()) {
        throw UsageError(
            "--live needs serve's endpoints: --ingest and --publish, or --endpoints FILE");
    }
    if (o.speed < 0.0) throw UsageError("--speed must be 0 (as fast as possible) or positive");
    live.speed = o.speed;
    live.first_update_timeout = std::chrono::milliseconds(o.wait_ms);
    live.keys = clients::load_curve_client_keys(o.server_key, o.client_key);
    return live;
}

int run_replay(const ReplayOptions& o) {
    if (!o.live && (!o.ingest.empty() || !o.publish.empty() || !o.endpoints_file.empty() ||
                    o.speed != 0.0 || !o.server_key.empty() || !o.client_key.empty())) {
        throw UsageError("--ingest, --publish, --endpoints, --speed and the keys belong to --live");
    }
    backtest::BacktestOptions options;
    if (!o.params_file.empty()) options.params = files::load_params_file(o.params_file);
    options.threads = o.threads ? o.threads : std::max(1U, std::thread::hardware_concurrency());
    options.timelines = o.timelines;
    options.every_event = o.every_event;
    using Clock = std::chrono::steady_clock;
    auto since = [](Clock::time_point t) {
        return std::chrono::duration<double>(Clock::now() - t).count();
    };
    const auto start = Clock::now();
    const LoadedStreams loaded = load_streams(o.streams);
    const double read_seconds = since(start);
    const auto replay_start = Clock::now();

    backtest::BacktestResult result;
    std::string how;
    std::vector<std::string> problems;
    if (o.live) {
        live::LiveReplayOptions live = live_options(o);
        live.in_process = options;
        ProgressBar bar("replay --live", "messages", o.quiet);
        if (bar.drawing())
            live.progress = [&bar](std::size_t done, std::size_t total) {
                bar.update(done, total);
            };
        const auto received = live::run_live_replay(loaded.matches, live);
        result = received.scores;
        problems = received.problems;
        how = fmt::format(
            "live over sockets to {} at {}: {} messages sent in {:.2f} s; received {} updates on "
            "events and {} on "
            "the timer, {} missed, {} undecodable; the model's scores are what a subscriber "
            "received (largest "
            "difference from the in-process forecasts {:.3g})",
            fmt::join(live.ingest, ","),
            o.speed > 0 ? fmt::format("{}x real time", o.speed) : "full speed",
            received.messages_sent, received.send_seconds, received.updates_received,
            received.ticks_received, received.missed_updates, received.undecodable,
            received.largest_difference_from_in_process);
        if (received.matches_without_updates || received.matches_not_ended) {
            how += fmt::format("; {} matches without any update, {} whose end was not received",
                               received.matches_without_updates, received.matches_not_ended);
        }
    } else {
        ProgressBar bar("replay", "matches", o.quiet);
        if (bar.drawing())
            options.progress = [&bar](std::size_t done, std::size_t total) {
                bar.update(done, total);
            };
        result = backtest::run_backtest(loaded.matches, options);
        problems = result.problems;
        how = fmt::format(
            "in process on {} thread(s){}", options.threads,
            o.every_event
                ? fmt::format(", the model priced after every event too ({} evaluations, {} "
                              "invalid)",
                              result.evaluations, result.invalid_outputs)
                : "");
    }
    const double replay_seconds = since(replay_start);
    const auto report_start = Clock::now();
    report::ReportHeading heading;
    heading.source = fmt::format(
        "{} stream file(s) read in {:.2f} s, {} bad record(s) skipped; replayed {} in {:.2f} s.",
        loaded.files, read_seconds, loaded.bad_records, how, replay_seconds);
    report::write_report(o.report_dir, result, heading);
    print_table(result);
    std::cout << fmt::format(
        "{} matches scored ({} abandoned, {} unfinished, {} unusable), replayed {}; {:.2f} s in "
        "all: streams read {:.2f} s, replay {:.2f} s, report written {:.2f} s; report: {}\n",
        result.scored, result.abandoned, result.unfinished, result.unusable, how, since(start),
        read_seconds, replay_seconds, since(report_start),
        (std::filesystem::path(o.report_dir) / "index.html").string());
    for (const auto& problem : problems) std::cerr << "liveprob replay: " << problem << "\n";
    return kExitOk;
}

const Registration registration{{
    "replay",
    "replay recorded streams (in process, or --live through a running serve) and write a "
    "calibration report",
    [](CLI::App& sub) -> std::function<int()> {
        auto o = std::make_shared<ReplayOptions>();
        sub.add_option("streams", o->streams, "stream files or directories of them")->required();
        sub.add_option("--report", o->report_dir, "directory for index.html and report.json")
            ->required();
        sub.add_option("--params", o->params_file,
                       "model parameter file (default: built-in values; live: give serve's)");
        sub.add_option("--threads", o->threads, "worker threads (0: every core)")
            ->capture_default_str();
        sub.add_option("--timelines", o->timelines, "per-match timelines drawn in the report")
            ->capture_default_str();
        sub.add_flag("--every-event", o->every_event,
                     "also price the model after every event, as serve publishes");
        sub.add_flag("--quiet", o->quiet, "no progress bar");
        sub.add_flag("--live", o->live,
                     "send the streams to a running serve and score what a subscriber receives");
        sub.add_option("--ingest", o->ingest,
                       "live: serve's ingest endpoint (shards: each, in order, comma-separated)")
            ->delimiter(',');
        sub.add_option("--publish", o->publish, "live: serve's (or the relay's) publish endpoint");
        sub.add_option("--endpoints", o->endpoints_file,
                       "live: serve's endpoints file (ingest= and publish= lines)");
        sub.add_option("--speed", o->speed,
                       "live: times real time by the streams' timestamps (0: as fast as possible)")
            ->capture_default_str();
        sub.add_option("--wait-ms", o->wait_ms, "live: how long to wait for serve's first update")
            ->check(CLI::Range(1, 600'000))
            ->capture_default_str();
        sub.add_option("--server-key", o->server_key,
                       "live, CURVE: the service's .public key file");
        sub.add_option("--client-key", o->client_key, "live, CURVE: this feed's .secret key file");
        return [o] { return run_replay(*o); };
    },
}};

}  // namespace
}  // namespace liveprob::cli
