// `liveprob replay STREAMS... --report DIR`: replays recorded streams through the engine in
// process on all cores and writes the calibration report (index.html and report.json).
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
        sub.add_flag("--quiet", o->quiet, "no progress bar");
        return [o] {
            replay::BacktestOptions options;
            if (!o->params_file.empty()) options.params = load_params_file(o->params_file);
            options.threads = o->threads ? o->threads : std::max(1U, std::thread::hardware_concurrency());
            options.timelines = o->timelines;
            const auto start = std::chrono::steady_clock::now();
            ProgressBar bar("replay", "matches", o->quiet);
            if (bar.drawing()) options.progress = [&bar](std::size_t done, std::size_t total) { bar.update(done, total); };
            std::vector<InboundMessage> all;
            std::uint64_t bad_records = 0;
            const auto files = stream_files(o->streams);
            for (const auto& file : files) {
                auto contents = replay::read_stream(file);
                if (contents.bad_records) {
                    bad_records += contents.bad_records;
                    std::cerr << "liveprob replay: " << contents.bad_records << " bad record(s) skipped; first: " << contents.first_problem << "\n";
                }
                all.insert(all.end(), std::make_move_iterator(contents.messages.begin()), std::make_move_iterator(contents.messages.end()));
            }
            const auto matches = replay::group_by_match(all);
            const auto result = replay::run_backtest(matches, options);
            const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
            replay::ReportHeading heading;
            heading.source = fmt::format("{} stream file(s), {} bad record(s) skipped; replayed in {:.2f} s on {} thread(s).",
                                         files.size(), bad_records, seconds, options.threads);
            replay::write_report(o->report_dir, result, heading);
            std::cout << fmt::format("{:>5} {:>6} {:>9} {:>9} {:>9} {:>8}\n", "min", "n", "rps", "fixed", "uniform", "ece");
            for (int b = 0; b < replay::kBuckets; ++b) {
                std::cout << fmt::format("{:>5} {:>6} {:>9.5f} {:>9.5f} {:>9.5f} {:>8.4f}\n", replay::bucket_label(b),
                                         result.at(b, replay::Forecaster::model).count(),
                                         result.at(b, replay::Forecaster::model).mean_rps(),
                                         result.at(b, replay::Forecaster::fixed_prior).mean_rps(),
                                         result.at(b, replay::Forecaster::uniform_timing_no_state).mean_rps(),
                                         result.at(b, replay::Forecaster::model).calibration().expected_calibration_error());
            }
            std::cout << fmt::format("{} matches scored ({} abandoned, {} unfinished, {} unusable) in {:.2f} s; report: {}\n",
                                     result.scored, result.abandoned, result.unfinished, result.unusable, seconds,
                                     (std::filesystem::path(o->report_dir) / "index.html").string());
            for (const auto& problem : result.problems) std::cerr << "liveprob replay: " << problem << "\n";
            return kExitOk;
        };
    },
}};

}  // namespace
}  // namespace liveprob::cli
