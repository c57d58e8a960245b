// `liveprob replay STREAMS... --report DIR`: replays recorded streams and writes the calibration
// report (index.html and report.json), printing the score table. Fast mode runs the engine in
// process on all cores; --live sends the streams over real sockets to a running `serve` at a
// chosen speed and scores what a subscriber received
// (replay-demo/live/include/liveprob/live/live_replay.hpp).
#include <algorithm>
#include <chrono>
#include <filesystem>
#include <iostream>
#include <map>
#include <memory>
#include <optional>
#include <thread>
#include <tuple>
#include <unordered_map>

#include <fmt/format.h>
#include <fmt/ranges.h>

#include "command_registry.hpp"
#include "liveprob/backtest/backtest.hpp"
#include "liveprob/backtest/comparison.hpp"
#include "liveprob/backtest/elo_reference.hpp"
#include "liveprob/datasets/international_history.hpp"
#include "liveprob/datasets/league_record.hpp"
#include "liveprob/files/endpoints_file.hpp"
#include "liveprob/files/file_fingerprint.hpp"
#include "liveprob/files/params_file.hpp"
#include "liveprob/live/live_replay.hpp"
#include "liveprob/report/report_html.hpp"
#include "liveprob/system/version.hpp"
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
    // the comparison (in process)
    std::string elo_data;
    std::vector<std::string> variants;  // NAME=[PARAMS][@STREAMS]
    std::uint64_t seed = 20261202;
    int resamples = 1000;
    int calibration_draws = 200;
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
    std::vector<std::filesystem::path> files;
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
    out.files = files;
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

// The comparison: every forecaster's RPS, the model against each (relative difference, %, with
// its interval), and the model's ECE beside a perfectly calibrated forecaster's mean and 95th
// percentile at that n.
void print_comparison(const backtest::Evaluation& e) {
    std::string head = fmt::format("{:>5} {:>6}", "min", "n");
    for (std::size_t c = 0; c < e.columns.size(); ++c)
        if (e.buckets[0].columns[c].n) head += fmt::format(" {:>9.9}", e.columns[c]);
    for (std::size_t c = 1; c < e.columns.size(); ++c)
        if (e.buckets[0].columns[c].n) head += fmt::format(" {:>24.24}", "vs " + e.columns[c]);
    std::cout << head << fmt::format(" {:>7} {:>15}\n", "ece", "calibrated");
    for (int b = 0; b < scoring::kBuckets; ++b) {
        const auto& bucket = e.buckets[static_cast<std::size_t>(b)];
        std::string line =
            fmt::format("{:>5} {:>6}", scoring::bucket_label(b), bucket.columns[0].n);
        for (std::size_t c = 0; c < e.columns.size(); ++c) {
            if (!e.buckets[0].columns[c].n) continue;
            const auto& s = bucket.columns[c];
            line += s.n ? fmt::format(" {:>9.5f}", s.rps) : fmt::format(" {:>9}", "-");
        }
        for (std::size_t c = 1; c < e.columns.size(); ++c) {
            const auto& d = bucket.model_against[c];
            if (!e.buckets[0].columns[c].n) continue;
            line += d.n ? fmt::format(" {:>+7.2f}% [{:+6.2f},{:+6.2f}]", 100 * d.relative,
                                      100 * d.relative_low, 100 * d.relative_high)
                        : fmt::format(" {:>24}", "-");
        }
        const auto& m = bucket.columns[0];
        line +=
            fmt::format(" {:>7.4f} {:>6.4f}/{:>6.4f}", m.ece, m.calibrated.mean, m.calibrated.p95);
        std::cout << line << "\n";
    }
    std::cout << fmt::format(
        "paired bootstrap: {} resamples, seed {}, {:.0f}% intervals; negative: the model is "
        "better\n",
        e.settings.bootstrap.resamples, e.settings.bootstrap.seed,
        100 * e.settings.bootstrap.level);
    for (const auto& w : e.warnings) std::cout << "warning: " << w << "\n";
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

// --variant NAME=[PARAMETER_FILE][@STREAMS]: a further configuration, its own parameter file
// (default: the model's) and its own streams of the same matches (default: the same streams).
struct VariantSpec {
    std::string name, params, streams;
};
VariantSpec parse_variant(const std::string& text) {
    const auto eq = text.find('=');
    if (eq == std::string::npos || eq == 0 || eq + 1 == text.size())
        throw UsageError("--variant takes NAME=PARAMETER_FILE[@STREAMS] or NAME=@STREAMS, not '" +
                         text + "'");
    const std::string rest = text.substr(eq + 1);
    const auto at = rest.rfind('@');
    VariantSpec spec{text.substr(0, eq), rest.substr(0, at),
                     at == std::string::npos ? "" : rest.substr(at + 1)};
    if (spec.params.empty() && spec.streams.empty())
        throw UsageError("--variant " + text + ": give a parameter file, streams, or both");
    return spec;
}

// The day (UTC) of a scheduled kick-off.
int day_of(std::int64_t us) {
    constexpr std::int64_t kDayUs = 86'400'000'000LL;
    return static_cast<int>(us >= 0 ? us / kDayUs : (us - kDayUs + 1) / kDayUs);
}

// Each match that opens with a setup, as an Elo fixture, with its id: read once per run.
struct SetupFixture {
    std::uint64_t id = 0;
    backtest::EloFixture fixture;
};
std::vector<SetupFixture> setup_fixtures(const std::vector<backtest::MatchMessages>& matches) {
    std::vector<SetupFixture> out;
    for (const auto& m : matches) {
        if (m.empty()) continue;
        const auto* setup = std::get_if<core::MatchSetup>(&m.front().body);
        if (!setup) continue;
        out.push_back({m.front().header.match_id,
                       {day_of(setup->scheduled_kickoff_us), setup->home_name, setup->away_name,
                        setup->neutral_venue}});
    }
    return out;
}

// The key a result and a fixture share: (day, home, away).
std::tuple<int, std::string, std::string> fixture_key(const backtest::EloFixture& f) {
    return {f.day, f.home, f.away};
}

// The Elo reference's means for every match with a setup, from the international record in
// `dir`; fills each match's competition where the record has its (day, home, away).
std::unordered_map<std::uint64_t, backtest::ReferenceMeans> elo_reference_for(
    const std::vector<backtest::MatchMessages>& matches, const std::string& dir,
    std::unordered_map<std::uint64_t, backtest::MatchFacts>& facts) {
    const auto history = datasets::read_international_history(dir);
    std::vector<std::string> names;
    for (const auto& r : history.results) names.push_back(r.competition);
    const std::string world_finals = backtest::world_finals_in(names);
    std::vector<backtest::EloResult> results;
    std::map<std::tuple<int, std::string, std::string>, std::string> competition;
    for (const auto& r : history.results) {
        results.push_back({r.result, backtest::elo_match_class(r.competition, world_finals)});
        competition.emplace(std::tuple{r.result.day, r.result.home, r.result.away}, r.competition);
    }
    std::vector<backtest::GoalMinute> minutes;
    for (const auto& g : history.goal_minutes) minutes.push_back({g.day, g.minute});
    std::vector<backtest::EloFixture> fixtures;
    std::vector<std::uint64_t> ids;
    for (auto& [id, fixture] : setup_fixtures(matches)) {
        if (const auto it = competition.find(fixture_key(fixture)); it != competition.end())
            facts[id].competition = it->second;
        fixtures.push_back(std::move(fixture));
        ids.push_back(id);
    }
    const auto reference = backtest::elo_reference(results, minutes, fixtures);
    std::unordered_map<std::uint64_t, backtest::ReferenceMeans> out;
    for (std::size_t i = 0; i < fixtures.size(); ++i)
        if (reference.means[i]) out.emplace(ids[i], *reference.means[i]);
    return out;
}

// Whether --elo-data names the league folder (seasons of league files) rather than the
// international one (results.csv beside goalscorers.csv).
bool is_league_folder(const std::string& dir) {
    return !std::filesystem::exists(std::filesystem::path(dir) / "results.csv");
}

// The Elo reference for league matches, from the league folder: each league on its own (its
// results, its goals map), K = 20 for every league match (common practice for club ratings, from
// memory), the remaining share of goals at 45' from the leagues' own half-time and full-time
// scores before each year (first-half goals count as seen by 45', second-half ones not). Fills
// each match's competition with its league.
std::unordered_map<std::uint64_t, backtest::ReferenceMeans> league_elo_reference_for(
    const std::vector<backtest::MatchMessages>& matches, const std::string& dir,
    std::unordered_map<std::uint64_t, backtest::MatchFacts>& facts) {
    const auto record = datasets::read_league_folder(dir);
    std::map<std::tuple<int, std::string, std::string>, std::string> league_of;
    for (const auto& [league, results] : record.results)
        for (const auto& r : results) league_of.emplace(std::tuple{r.day, r.home, r.away}, league);
    // Goals by half, dated: seen by 45' (minute 44 of the histogram) or after it (minute 90).
    std::map<std::string, std::vector<backtest::GoalMinute>> minutes;
    for (const auto& t : record.matches)
        for (const auto& g : t.goals)
            minutes[t.competition].push_back({t.day, g.minute <= 45 ? 44 : 90});
    std::unordered_map<std::uint64_t, backtest::ReferenceMeans> out;
    // Each match with a setup goes to its league's fixtures (one pass over the matches).
    std::map<std::string, std::pair<std::vector<backtest::EloFixture>, std::vector<std::uint64_t>>>
        by_league;
    for (auto& [id, fixture] : setup_fixtures(matches)) {
        const auto it = league_of.find(fixture_key(fixture));
        if (it == league_of.end()) continue;
        facts[id].competition = it->second;
        auto& [fixtures, ids] = by_league[it->second];
        fixtures.push_back(std::move(fixture));
        ids.push_back(id);
    }
    backtest::EloSettings settings;
    settings.k = {20.0, 20.0, 20.0, 20.0};
    for (const auto& league : record.leagues) {
        const auto found = by_league.find(league);
        if (found == by_league.end()) continue;
        const auto& [fixtures, ids] = found->second;
        std::vector<backtest::EloResult> results;
        for (const auto& r : record.results.at(league))
            results.push_back({r, backtest::EloMatchClass::friendly});
        const auto reference =
            backtest::elo_reference(results, minutes[league], fixtures, settings);
        for (std::size_t i = 0; i < fixtures.size(); ++i)
            if (reference.means[i]) out.emplace(ids[i], *reference.means[i]);
    }
    return out;
}

// What the run read, fingerprinted.
report::RunInputs run_inputs(const ReplayOptions& o, const LoadedStreams& loaded) {
    report::RunInputs inputs;
    inputs.program_version = system::version_string();
    // The options that decide the figures (paths as given).
    inputs.command_line = fmt::format("liveprob replay {}", fmt::join(o.streams, " "));
    if (!o.params_file.empty()) inputs.command_line += " --params " + o.params_file;
    for (const auto& v : o.variants) inputs.command_line += " --variant " + v;
    if (!o.elo_data.empty()) inputs.command_line += " --elo-data " + o.elo_data;
    inputs.command_line += fmt::format(" --seed {} --resamples {} --calibration-draws {}", o.seed,
                                       o.resamples, o.calibration_draws);
    auto add = [&](const char* role, const std::string& path) {
        inputs.files.push_back({role, path, files::file_sha256_hex(path)});
    };
    if (!o.params_file.empty()) add("parameters", o.params_file);
    for (const auto& v : o.variants) {
        const auto spec = parse_variant(v);
        if (!spec.params.empty()) add("variant parameters", spec.params);
        if (!spec.streams.empty())
            for (const auto& f : stream_files({spec.streams})) add("variant stream", f.string());
    }
    if (!o.elo_data.empty() && is_league_folder(o.elo_data)) {
        std::vector<std::string> files;
        for (const auto& e : std::filesystem::recursive_directory_iterator(o.elo_data))
            if (e.is_regular_file() && e.path().extension() == ".json")
                files.push_back(e.path().string());
        std::sort(files.begin(), files.end());
        for (const auto& f : files) add("reference data", f);
    } else if (!o.elo_data.empty()) {
        for (const char* name : {"results.csv", "goalscorers.csv"})
            add("reference data", (std::filesystem::path(o.elo_data) / name).string());
    }
    for (const auto& f : loaded.files) add("stream", f.string());
    return inputs;
}

int run_replay(const ReplayOptions& o) {
    if (!o.live && (!o.ingest.empty() || !o.publish.empty() || !o.endpoints_file.empty() ||
                    o.speed != 0.0 || !o.server_key.empty() || !o.client_key.empty())) {
        throw UsageError("--ingest, --publish, --endpoints, --speed and the keys belong to --live");
    }
    if (o.live && (!o.elo_data.empty() || !o.variants.empty()))
        throw UsageError(
            "--elo-data and --variant compare forecasters in process, not with --live");
    if (o.resamples < 1) throw UsageError("--resamples must be at least 1");
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

    std::unordered_map<std::uint64_t, backtest::MatchFacts> facts;
    std::optional<report::Comparison> comparison;
    std::vector<VariantSpec> variants;
    for (const auto& v : o.variants) variants.push_back(parse_variant(v));
    const report::RunInputs inputs = run_inputs(o, loaded);
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
        // The Elo reference and the matches' competitions, from the international record.
        std::unordered_map<std::uint64_t, backtest::ReferenceMeans> elo;
        if (!o.elo_data.empty()) {
            const auto reference = is_league_folder(o.elo_data)
                                       ? league_elo_reference_for(loaded.matches, o.elo_data, facts)
                                       : elo_reference_for(loaded.matches, o.elo_data, facts);
            elo = reference;
            options.elo = &elo;
        }
        const auto replays = backtest::replay_matches(loaded.matches, options);
        result = backtest::sum_replays(replays, options.timelines);
        problems = result.problems;
        // Further configurations on the same matches.
        std::vector<std::vector<backtest::MatchReplay>> variant_replays;
        std::vector<backtest::ConfigurationRun> runs;
        for (const auto& v : variants) {
            backtest::BacktestOptions vo = options;
            if (!v.params.empty()) vo.params = files::load_params_file(v.params);
            vo.elo = nullptr;
            vo.timelines = 0;
            vo.progress = nullptr;
            if (v.streams.empty()) {
                variant_replays.push_back(backtest::replay_matches(loaded.matches, vo));
            } else {
                const auto own = load_streams({v.streams});
                variant_replays.push_back(backtest::replay_matches(own.matches, vo));
            }
        }
        for (std::size_t v = 0; v < variants.size(); ++v)
            runs.push_back({variants[v].name, &variant_replays[v]});
        comparison.emplace();
        comparison->table = backtest::scored_table(replays, runs, facts);
        backtest::EvaluationSettings settings;
        settings.bootstrap.seed = o.seed;
        settings.bootstrap.resamples = o.resamples;
        settings.calibration_draws = o.calibration_draws;
        comparison->evaluation = backtest::evaluate(comparison->table, settings);
        comparison->inputs = inputs;
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
        loaded.files.size(), read_seconds, loaded.bad_records, how, replay_seconds);
    report::write_report(o.report_dir, result, heading, comparison ? &*comparison : nullptr);
    if (comparison) print_comparison(comparison->evaluation);
    else print_table(result);
    std::cout << fmt::format(
        "{} matches scored ({} abandoned, {} unfinished, {} unusable), replayed {}; {:.2f} s in "
        "all: streams read {:.2f} s, replay {:.2f} s, report written {:.2f} s; report: {}\n",
        result.scored, result.abandoned, result.unfinished, result.unusable, how, since(start),
        read_seconds, replay_seconds, since(report_start),
        (std::filesystem::path(o.report_dir) / "index.html").string());
    for (const auto& problem : problems) std::cerr << "liveprob replay: " << problem << "\n";
    if (result.scored == 0) {
        std::cerr << "liveprob replay: no match was scored (" << result.matches
                  << " matches in the streams)\n";
        return kExitFailure;
    }
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
        sub.add_option("--elo-data", o->elo_data,
                       "folder with the international results.csv and goalscorers.csv, or the "
                       "folder of league seasons: adds the naive Elo reference and each match's "
                       "competition");
        sub.add_option("--variant", o->variants,
                       "NAME=PARAMETER_FILE[@STREAMS]: a further configuration scored on the "
                       "same matches (paired by match id), with its own parameter file and/or "
                       "streams of the same matches imported with other rating settings "
                       "(repeatable)");
        sub.add_option("--seed", o->seed, "seed of the bootstrap and the calibration draws")
            ->capture_default_str();
        sub.add_option("--resamples", o->resamples, "bootstrap resamples of the matches")
            ->capture_default_str();
        sub.add_option("--calibration-draws", o->calibration_draws,
                       "outcome sets drawn for a perfectly calibrated forecaster's ECE")
            ->capture_default_str();
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
