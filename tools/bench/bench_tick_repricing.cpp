// The timer's re-pricing of a match in play, exact against clock interpolation, in one run:
// knock-out matches under the full model (1-0, the away side down to ten, Gamma strength
// mixture, extra time and shoot-out to price) tick once a second through the second half, each
// tick advancing the clock and pricing into the service's one buffer. Every tick is timed, so
// the figures are per match per tick: median and tails, and the mean, which carries the window
// solves (amortised). Argument 2: seconds between clock syncs per match (0: none; a sync keeps
// a ready window and restarts one still filling).
//   liveprob_bench_tick_repricing --benchmark_repetitions=3 --benchmark_report_aggregates_only=true
#include <benchmark/benchmark.h>

#include <algorithm>
#include <chrono>
#include <cstdint>
#include <vector>

#include "bench_messages.hpp"
#include "liveprob/core/match.hpp"

namespace {

using namespace liveprob;
using namespace liveprob::core;
using SteadyClock = std::chrono::steady_clock;

constexpr std::uint32_t kMinute = 60'000;

using bench::message;

// A knock-out match at 45:00 of the second half's start: 1-0, a red card for the away side.
Match second_half_match(std::uint64_t id, bool interpolate) {
    MatchSetup setup;
    setup.prior = PriorMeans{1.3 + 0.001 * static_cast<double>(id % 400), 1.1};
    setup.format.extra_time = true;
    setup.format.shootout = true;
    Match match(id, setup, ModelParams{});
    match.set_clock_interpolation(interpolate);
    std::uint64_t seq = 1;
    (void)match.apply(message(id, seq++, Period::first_half, 0, PeriodStart{Period::first_half}));
    (void)match.apply(message(id, seq++, Period::first_half, 20 * kMinute, Goal{Side::home}));
    (void)match.apply(message(id, seq++, Period::first_half, 30 * kMinute, RedCard{Side::away}));
    (void)match.apply(
        message(id, seq++, Period::first_half, 47 * kMinute, PeriodEnd{Period::first_half}));
    (void)match.apply(
        message(id, seq++, Period::second_half, 45 * kMinute, PeriodStart{Period::second_half}));
    return match;
}

double percentile(std::vector<double>& sorted, double q) {
    const auto k = static_cast<std::size_t>(q * static_cast<double>(sorted.size() - 1));
    return sorted[k];
}

void tick_repricing(benchmark::State& state) {
    const bool interpolate = state.range(0) != 0;
    const auto message_every_s = static_cast<std::uint32_t>(state.range(1));
    constexpr std::uint64_t kMatches = 40;
    constexpr std::uint32_t kTicks = 45 * 60;  // 45:00 to 89:59, a tick a second
    std::vector<double> tick_ns;
    tick_ns.reserve(kMatches * kTicks);
    double checksum = 0.0;
    for (auto _ : state) {
        state.PauseTiming();
        std::vector<Match> matches;
        for (std::uint64_t id = 1; id <= kMatches; ++id)
            matches.push_back(second_half_match(id, interpolate));
        std::vector<std::uint64_t> seq(kMatches, 100);
        Outputs out;
        tick_ns.clear();
        state.ResumeTiming();
        for (std::uint32_t s = 1; s <= kTicks; ++s) {
            const std::uint32_t clock = 45 * kMinute + s * 1000;
            for (std::uint64_t i = 0; i < kMatches; ++i) {
                Match& m = matches[i];
                // Spread the matches' messages over the interval, not all on one tick.
                if (message_every_s != 0 && (s + i * 7) % message_every_s == 0) {
                    (void)m.apply(
                        message(i + 1, ++seq[i], Period::second_half, clock, ClockSync{true}));
                }
                const auto t0 = SteadyClock::now();
                (void)m.advance_to({Period::second_half, clock});
                m.price_into(out);
                const auto t1 = SteadyClock::now();
                checksum += out.p_home;
                tick_ns.push_back(static_cast<double>(
                    std::chrono::duration_cast<std::chrono::nanoseconds>(t1 - t0).count()));
            }
        }
    }
    benchmark::DoNotOptimize(checksum);
    double sum = 0.0;
    for (double v : tick_ns) sum += v;
    const double mean = sum / static_cast<double>(tick_ns.size());
    std::sort(tick_ns.begin(), tick_ns.end());
    state.counters["tick_median_us"] = percentile(tick_ns, 0.5) / 1000.0;
    state.counters["tick_p99_us"] = percentile(tick_ns, 0.99) / 1000.0;
    state.counters["tick_p999_us"] = percentile(tick_ns, 0.999) / 1000.0;
    state.counters["tick_max_us"] = tick_ns.back() / 1000.0;
    state.counters["tick_mean_us"] = mean / 1000.0;  // window solves amortised
    // At 1 Hz, N matches take N x mean per second: the share of one core for 20,000.
    state.counters["core_share_20k"] = 20'000.0 * mean / 1e9;
}

}  // namespace

BENCHMARK(tick_repricing)
    ->ArgNames({"interpolate", "message_every_s"})
    ->Args({0, 0})
    ->Args({1, 0})
    ->Args({1, 60})
    ->Args({1, 10})
    ->Iterations(1)
    ->Unit(benchmark::kMillisecond);

BENCHMARK_MAIN();
