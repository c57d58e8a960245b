// Fast-mode replay throughput: matches per second through `run_backtest`, the model priced at
// every bucket minute and (the aim's workload) after every accepted event as serve would publish
// it, on 1 and 2 threads (wall time: the work runs on the backtest's own threads). Beside it, in
// the same run: the same streams with the plain Poisson parameters (κ = ∞, no state effects),
// the cheapest pricing path, and the buckets-only evaluation. Streams: a fixed sample of the open
// international matches as `liveprob import` builds them (every 12th), with priors from one
// rating fit on all results (for timing only; the backtest's priors are walk-forward), and the
// invented demo season.
#include <benchmark/benchmark.h>
#include <sys/resource.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <string>

#include "liveprob/backtest/backtest.hpp"
#include "liveprob/datasets/match_timelines.hpp"
#include "liveprob/datasets/results_readers.hpp"
#include "liveprob/datasets/timeline_feed.hpp"
#include "liveprob/demo/demo_season.hpp"
#include "liveprob/fit/dixon_coles.hpp"

namespace {

using namespace liveprob;
using namespace liveprob::datasets;

using namespace liveprob::core;

std::filesystem::path open_data() {
    const char* env = std::getenv("LIVEPROB_OPEN_DATA");
    return env && *env ? std::filesystem::path(env)
                       : std::filesystem::path(LIVEPROB_SOURCE_DIR) / "tests/data/open";
}

const std::vector<backtest::MatchMessages>& international_sample() {
    static const auto matches = [] {
        const auto dir = open_data() / "international";
        const auto read = datasets::read_international_timelines(dir.string());
        const auto results = read_international_results((dir / "results.csv").string()).matches;
        fit::RatingsFitOptions o;
        o.xi = std::log(2.0) / 730.0;
        o.min_matches = 6.0;
        o.min_weight = 0.01;
        o.standard_errors = false;
        const auto ratings = fit::fit_ratings(results, o);
        std::vector<backtest::MatchMessages> out;
        const fit::TeamRating average{};
        for (std::size_t i = 0; i < read.matches.size(); i += 12) {
            const auto& t = read.matches[i];
            const auto* h = ratings.find(t.home);
            const auto* a = ratings.find(t.away);
            const auto g =
                fit::expected_goals(ratings, h ? *h : average, a ? *a : average, t.neutral);
            out.push_back(datasets::feed_from_timeline(
                t, 10'000'000 + t.origin_number,
                PriorMeans{std::min(g.home, 10.0), std::min(g.away, 10.0)}));
        }
        return out;
    }();
    return matches;
}

const std::vector<backtest::MatchMessages>& demo_season() {
    static const auto matches = [] {
        const auto season = demo::simulate_demo_season(demo::make_demo_league(2031), 2031);
        std::vector<backtest::MatchMessages> out;
        for (const auto& m : season.league) out.push_back(m.messages);
        for (const auto& m : season.cup) out.push_back(m.messages);
        return out;
    }();
    return matches;
}

// CPU seconds of every thread of this process so far.
double process_cpu_seconds() {
    rusage usage{};
    ::getrusage(RUSAGE_SELF, &usage);
    auto seconds = [](const timeval& t) {
        return static_cast<double>(t.tv_sec) + 1e-6 * static_cast<double>(t.tv_usec);
    };
    return seconds(usage.ru_utime) + seconds(usage.ru_stime);
}

// Args: {every event (0/1), threads, full model (1) or plain Poisson (0)}. Beside the wall-time
// rate, matches per CPU-second over all threads: on a machine shared with other work, wall time
// shows the cores this process got, while an unchanged per-CPU-second rate on more threads shows
// that the work itself scales.
void replay_streams(benchmark::State& state, const std::vector<backtest::MatchMessages>& matches) {
    backtest::BacktestOptions options;
    options.every_event = state.range(0) != 0;
    options.threads = static_cast<unsigned>(state.range(1));
    options.timelines = 0;
    if (state.range(2) == 0) options.params = ModelParams::plain_poisson();
    std::uint64_t evaluations = 0, messages = 0;
    double cpu = 0.0;
    for (auto _ : state) {
        const double cpu_before = process_cpu_seconds();
        const auto result = backtest::run_backtest(matches, options);
        if (result.invalid_outputs != 0) state.SkipWithError("invalid outputs");
        evaluations = result.evaluations;
        messages = result.messages;
        benchmark::DoNotOptimize(result);
        cpu += process_cpu_seconds() - cpu_before;
    }
    const double n = static_cast<double>(matches.size());
    state.SetItemsProcessed(state.iterations() * static_cast<std::int64_t>(matches.size()));
    state.counters["evaluations_per_match"] = static_cast<double>(evaluations) / n;
    state.counters["messages_per_match"] = static_cast<double>(messages) / n;
    state.counters["matches_per_cpu_s"] = n * static_cast<double>(state.iterations()) / cpu;
    state.counters["matches_per_s_per_thread"] = benchmark::Counter(
        n * static_cast<double>(state.iterations()) / static_cast<double>(state.range(1)),
        benchmark::Counter::kIsRate);
}

void BM_ReplayInternational(benchmark::State& state) {
    replay_streams(state, international_sample());
}
void BM_ReplayDemoSeason(benchmark::State& state) { replay_streams(state, demo_season()); }

void arguments(benchmark::internal::Benchmark* b) {
    b->ArgNames({"every_event", "threads", "full"});
    for (const int full : {1, 0})
        for (const int threads : {1, 2}) b->Args({1, threads, full});
    b->Args({0, 1, 1});  // buckets only, full model, one thread
    b->Unit(benchmark::kMillisecond)->UseRealTime()->Iterations(1);
}

}  // namespace

BENCHMARK(BM_ReplayInternational)->Apply(arguments);
BENCHMARK(BM_ReplayDemoSeason)->Apply(arguments);

BENCHMARK_MAIN();
