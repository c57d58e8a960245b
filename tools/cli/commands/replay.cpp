// `liveprob replay STREAMS... --report DIR`: replays recorded streams and writes the calibration
// report (index.html and report.json), printing the score table. It runs the engine in process
// on all cores.
#include <chrono>
#include <filesystem>
#include <iostream>
#include <memory>
#include <thread>

#include <fmt/format.h>

#include "command_registry.hpp"
#include "liveprob/adapters/params_file.hpp"
#include "liveprob/replay/backtest.hpp"
#include "liveprob/replay/report_html.hpp"
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
    std::vector<replay::MatchMessages> matches;
    std::size_t files = 0;
    std::uint64_t bad_records = 0;
};

LoadedStreams load_streams(const std::vector<std::string>& args) {
    LoadedStreams out;
    std::vector<InboundMessage> all;
    const auto files = stream_files(args);
    for (const auto& file : files) {
        auto contents = replay::read_stream(file);
        if (contents.bad_records) {
            out.bad_records += contents.bad_records;
            std::cerr << "liveprob replay: " << contents.bad_records << " bad record(s) skipped; first: " << contents.first_problem << "\n";
        }
        all.insert(all.end(), std::make_move_iterator(contents.messages.begin()), std::make_move_iterator(contents.messages.end()));
    }
    out.files = files.size();
    out.matches = replay::group_by_match(all);
    return out;
}

void print_table(const replay::BacktestResult& result) {
    using replay::Forecaster;
    std::cout << fmt::format("{:>5} {:>6} {:>9} {:>9} {:>9} {:>8}\n", "min", "n", "rps", "fixed", "uniform", "ece");
    for (int b = 0; b < replay::kBuckets; ++b) {
        std::cout << fmt::format("{:>5} {:>6} {:>9.5f} {:>9.5f} {:>9.5f} {:>8.4f}\n", replay::bucket_label(b),
                                 result.at(b, Forecaster::model).count(), result.at(b, Forecaster::model).mean_rps(),
                                 result.at(b, Forecaster::fixed_prior).mean_rps(),
                                 result.at(b, Forecaster::uniform_timing_no_state).mean_rps(),
                                 result.at(b, Forecaster::model).calibration().expected_calibration_error());
    }
}

int run_replay(const ReplayOptions& o) {
    replay::BacktestOptions options;
    if (!o.params_file.empty()) options.params = load_params_file(o.params_file);
    options.threads = o.threads ? o.threads : std::max(1U, std::thread::hardware_concurrency());
    options.timelines = o.timelines;
    options.every_event = o.every_event;
    const auto start = std::chrono::steady_clock::now();
    const LoadedStreams loaded = load_streams(o.streams);

    replay::BacktestResult result;
    std::string how;
    std::vector<std::string> problems;
    {
        ProgressBar bar("replay", "matches", o.quiet);
        if (bar.drawing()) options.progress = [&bar](std::size_t done, std::size_t total) { bar.update(done, total); };
        result = replay::run_backtest(loaded.matches, options);
        problems = result.problems;
        how = fmt::format("in process on {} thread(s){}", options.threads,
                          o.every_event ? fmt::format(", the model priced after every event too ({} evaluations, {} "
                                                      "invalid)",
                                                      result.evaluations, result.invalid_outputs)
                                        : "");
    }
    const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    replay::ReportHeading heading;
    heading.source = fmt::format("{} stream file(s), {} bad record(s) skipped; replayed {} in {:.2f} s.", loaded.files,
                                 loaded.bad_records, how, seconds);
    replay::write_report(o.report_dir, result, heading);
    print_table(result);
    std::cout << fmt::format("{} matches scored ({} abandoned, {} unfinished, {} unusable), replayed {}, in {:.2f} s; "
                             "report: {}\n",
                             result.scored, result.abandoned, result.unfinished, result.unusable, how, seconds,
                             (std::filesystem::path(o.report_dir) / "index.html").string());
    for (const auto& problem : problems) std::cerr << "liveprob replay: " << problem << "\n";
    return kExitOk;
}

const Registration registration{{
    "replay",
    "replay recorded streams through the engine and write a calibration report",
    [](CLI::App& sub) -> std::function<int()> {
        auto o = std::make_shared<ReplayOptions>();
        sub.add_option("streams", o->streams, "stream files or directories of them")->required();
        sub.add_option("--report", o->report_dir, "directory for index.html and report.json")->required();
        sub.add_option("--params", o->params_file, "model parameter file (default: built-in values)");
        sub.add_option("--threads", o->threads, "worker threads (0: every core)")->capture_default_str();
        sub.add_option("--timelines", o->timelines, "per-match timelines drawn in the report")->capture_default_str();
        sub.add_flag("--every-event", o->every_event, "also price the model after every event, as serve publishes");
        sub.add_flag("--quiet", o->quiet, "no progress bar");
        return [o] { return run_replay(*o); };
    },
}};

}  // namespace
}  // namespace liveprob::cli
