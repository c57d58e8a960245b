// liveprob_soak: a long run of the live service at a chosen event rate across many matches
// (not part of CI). It starts `liveprob serve` (one, or N shards behind `liveprob relay`),
// pushes a generated feed through the routing sender, reads every update through one
// subscriber, and reports throughput, latency tails (p50/p99/p99.9/max) and serve's memory and
// CPU over time, beside a baseline measured in the same run: the same feed through bare
// forwarders that do no work. Example (the figures in tools/bench/RESULTS.md):
//   build/release/tools/bench/liveprob_soak --minutes 10 --rate 5000 --matches 2000
#include <fmt/format.h>
#include <unistd.h>
#include <CLI/CLI.hpp>

#include <chrono>
#include <ctime>
#include <filesystem>
#include <fstream>
#include <iostream>

#include "soak_report.hpp"
#include "soak_run.hpp"

namespace {

using namespace liveprob::soak;

std::filesystem::path own_path() { return std::filesystem::read_symlink("/proc/self/exe"); }

std::string utc_now() {
    const std::time_t now = std::time(nullptr);
    char text[32];
    std::strftime(text, sizeof text, "%Y-%m-%d %H:%M UTC", std::gmtime(&now));
    return text;
}

}  // namespace

int main(int argc, char** argv) {
    // The baseline's forwarder is this program again, in another mode.
    if (argc == 4 && std::string(argv[1]) == "forward" &&
        std::string(argv[2]) == "--endpoints-file") {
        return run_bare_forwarder(argv[3]);
    }

    CLI::App app{"Soak the live service: throughput, latency tails and memory over a long run"};
    double minutes = 1.0;
    double match_minutes = 0.0;
    double baseline_seconds = 60.0;
    double warmup_seconds = 10.0;
    std::uint64_t matches = 1000;
    PhaseSettings s;
    s.liveprob = own_path().parent_path().parent_path() / "liveprob";
    s.self = own_path();
    std::string scratch = fmt::format("/tmp/liveprob-soak-{}", ::getpid());
    std::string json_file;
    bool no_journal = false;
    app.add_option("--minutes", minutes, "how long to feed")
        ->capture_default_str()
        ->check(CLI::PositiveNumber);
    app.add_option("--rate", s.rate, "feed messages per second")
        ->capture_default_str()
        ->check(CLI::PositiveNumber);
    app.add_option("--matches", matches, "matches playing at once")
        ->capture_default_str()
        ->check(CLI::Range(1, 1'000'000));
    app.add_option("--match-minutes", match_minutes,
                   "how long each match lasts, after which a new one takes its place (default: the "
                   "whole run)")
        ->check(CLI::NonNegativeNumber);
    app.add_option("--shards", s.shards, "serve processes (more than one: behind a relay)")
        ->capture_default_str()
        ->check(CLI::Range(1, 64));
    app.add_option("--tick-ms", s.tick_ms, "serve's republish interval")
        ->capture_default_str()
        ->check(CLI::Range(10, 3'600'000));
    app.add_flag("--no-journal", no_journal, "run serve without its journal");
    app.add_option("--sample-seconds", s.sample_seconds,
                   "memory and CPU sampling interval (rows of the table)")
        ->capture_default_str()
        ->check(CLI::PositiveNumber);
    app.add_option("--warmup-seconds", warmup_seconds, "left out of the whole-run latency tails")
        ->capture_default_str();
    app.add_option("--drain-seconds", s.drain_seconds,
                   "how long to wait for the backlog after sending")
        ->capture_default_str();
    app.add_option("--baseline-seconds", baseline_seconds,
                   "bare-forwarder baseline first, this long (0: none)")
        ->capture_default_str()
        ->check(CLI::NonNegativeNumber);
    app.add_option("--liveprob", s.liveprob, "the liveprob program")
        ->capture_default_str()
        ->check(CLI::ExistingFile);
    app.add_option("--scratch", scratch, "logs, endpoints files and journals go here")
        ->capture_default_str();
    app.add_option("--json", json_file, "also write the figures here as JSON");
    CLI11_PARSE(app, argc, argv);

    s.journal = !no_journal;
    s.seconds = minutes * 60.0;
    s.scratch = scratch;
    std::filesystem::create_directories(s.scratch);
    // Each match's messages: its share of the rate over its length.
    const double match_seconds = match_minutes > 0 ? match_minutes * 60.0 : s.seconds;
    const auto per_match = static_cast<std::uint64_t>(
        std::max(8.0, s.rate * match_seconds / static_cast<double>(matches)));
    const SoakFeed feed(matches, per_match);

    const std::string description = fmt::format(
        "Soak {}: {} events/s for {:.0f} s over {} concurrent matches ({} messages each, {:.1f} "
        "per match per "
        "second), {} serve{}, ticks every {} ms, journal {}",
        utc_now(), s.rate, s.seconds, matches, per_match, s.rate / static_cast<double>(matches),
        s.shards, s.shards > 1 ? " shards behind a relay" : "", s.tick_ms,
        s.journal ? "on (fsync interval)" : "off");
    std::cerr << description << "\n";

    std::optional<PhaseResult> baseline;
    if (baseline_seconds > 0) {
        PhaseSettings b = s;
        b.backend = Backend::bare_forwarder;
        b.seconds = baseline_seconds;
        std::cerr << fmt::format("baseline: bare forwarders for {:.0f} s\n", b.seconds);
        baseline = run_phase(b, feed);
    }
    std::cerr << fmt::format("soak: serve for {:.0f} s\n", s.seconds);
    const PhaseResult soak = run_phase(s, feed);

    std::cout << markdown_report(description, soak, baseline ? &*baseline : nullptr,
                                 warmup_seconds);
    if (!json_file.empty()) {
        std::ofstream(json_file) << json_report(description, soak, baseline ? &*baseline : nullptr,
                                                warmup_seconds);
    }
    return 0;
}
