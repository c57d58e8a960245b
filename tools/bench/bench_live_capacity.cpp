// Capacity of the live service's tick: how much of one core it takes to republish N live
// matches once (advance each match's clock, reprice, encode its update) and the heap each live
// match holds. At 1 Hz ticks, the share of a core is the time of one pass over all matches.
//   liveprob_bench_live_capacity --benchmark_repetitions=3 --benchmark_report_aggregates_only=true
#include <benchmark/benchmark.h>
#include <malloc.h>

#include <chrono>
#include <vector>

#include "bench_messages.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/service/match_registry.hpp"

namespace {

using namespace liveprob;

using namespace liveprob::core;
using SteadyClock = std::chrono::steady_clock;

using bench::message;

// N matches in the first half, as a service holds them mid-afternoon: set up, kicked off, a
// clock sync at 10:00; with `history`, also a goal, a card, and a clock sync every minute up
// to 30:00 (24 logged messages in all). `knockout`: extra time and a shoot-out to price.
void fill_registry(service::MatchRegistry& registry, std::uint64_t matches,
                   SteadyClock::time_point now, bool history = false, bool knockout = false) {
    std::vector<std::uint64_t> touched;
    for (std::uint64_t id = 1; id <= matches; ++id) {
        MatchSetup setup;
        setup.home_name = "Home side";
        setup.away_name = "Away side";
        setup.prior = PriorMeans{1.2 + 0.001 * static_cast<double>(id % 500), 1.1};
        setup.format.extra_time = knockout;
        setup.format.shootout = knockout;
        registry.handle(message(id, 1, Period::pre_match, 0, setup), 0, now, touched);
        registry.handle(message(id, 2, Period::first_half, 0, PeriodStart{Period::first_half}), 0,
                        now, touched);
        registry.handle(message(id, 3, Period::first_half, 600'000, ClockSync{true}), 0, now,
                        touched);
        if (!history) continue;
        std::uint64_t seq = 4;
        registry.handle(message(id, seq++, Period::first_half, 650'000, Goal{Side::home}), 0, now,
                        touched);
        registry.handle(message(id, seq++, Period::first_half, 700'000, RedCard{Side::away}), 0,
                        now, touched);
        for (std::uint32_t minute = 11; minute <= 30; ++minute) {
            registry.handle(
                message(id, seq++, Period::first_half, minute * 60'000, ClockSync{true}), 0, now,
                touched);
        }
    }
}

// Arguments: matches; 1 for knock-out matches with a goal and a red card (the full model's
// dearest position); 1 for the timer's clock interpolation.
void BM_TickPass(benchmark::State& state) {
    const auto matches = static_cast<std::uint64_t>(state.range(0));
    const bool knockout = state.range(1) != 0;
    service::MatchRegistry registry{ModelParams{}};
    registry.set_clock_interpolation(state.range(2) != 0);
    auto now = SteadyClock::now();
    fill_registry(registry, matches, now, knockout, knockout);
    protocol::UpdateEncoder encoder;
    Outputs outputs;  // one buffer for all matches, as the service keeps it
    std::size_t bytes = 0;
    for (auto _ : state) {
        now += std::chrono::seconds(1);  // one tick of a 1 Hz timer
        for (auto& [id, m] : registry.matches()) {
            registry.advance(m, now);
            m.match.price_into(outputs);
            protocol::UpdateMeta meta{id, ++m.output_seq, m.input_seq, 0, 0, 0};
            bytes += encoder.encode(meta, outputs).size();
        }
    }
    benchmark::DoNotOptimize(bytes);
    state.counters["matches"] = static_cast<double>(matches);
    // Seconds per pass = share of one core at one pass per second.
    state.counters["core_share_at_1Hz"] =
        benchmark::Counter(static_cast<double>(state.iterations()),
                           benchmark::Counter::kIsRate | benchmark::Counter::kInvert);
    state.counters["us_per_match"] =
        benchmark::Counter(static_cast<double>(state.iterations()) * static_cast<double>(matches),
                           benchmark::Counter::kIsRate | benchmark::Counter::kInvert,
                           benchmark::Counter::OneK::kIs1000);
}
BENCHMARK(BM_TickPass)
    ->ArgNames({"matches", "knockout", "interpolation"})
    ->Args({1000, 0, 0})
    ->Args({5000, 0, 0})
    ->Args({20000, 0, 0})
    ->Args({20000, 1, 0})
    ->Unit(benchmark::kMillisecond)
    ->MinTime(2.0);
// With interpolation a pass's cost depends on where the windows stand (a window's first 14
// ticks solve two positions each, the rest evaluate a polynomial), so the mean is taken over
// 900 passes: 15 minutes at 1 Hz, a whole window from the last message at 30:00 to 45:00.
BENCHMARK(BM_TickPass)
    ->ArgNames({"matches", "knockout", "interpolation"})
    ->Args({20000, 1, 1})
    ->Unit(benchmark::kMillisecond)
    ->Iterations(900);

// Heap per live match: the allocator's in-use bytes before and after creating N matches
// (argument 2: 0 = just kicked off, 1 = with 24 logged messages; argument 3: 1 = the timer's
// clock interpolation on) and ticking them once, so that anything a first pricing allocates is
// counted too.
void BM_MemoryPerMatch(benchmark::State& state) {
    const auto matches = static_cast<std::uint64_t>(state.range(0));
    const bool history = state.range(1) != 0;
    const bool interpolation = state.range(2) != 0;
    double per_match = 0;
    for (auto _ : state) {
        const std::size_t before = mallinfo2().uordblks;
        {
            service::MatchRegistry registry{ModelParams{}};
            registry.set_clock_interpolation(interpolation);
            const auto now = SteadyClock::now();
            fill_registry(registry, matches, now, history);
            Outputs outputs;
            for (auto& [id, m] : registry.matches()) {
                registry.advance(m, now + std::chrono::seconds(1));
                m.match.price_into(outputs);
            }
            per_match =
                static_cast<double>(mallinfo2().uordblks - before) / static_cast<double>(matches);
        }
    }
    state.counters["bytes_per_match"] = per_match;
}
BENCHMARK(BM_MemoryPerMatch)
    ->Args({1000, 0, 0})
    ->Args({20000, 0, 0})
    ->Args({20000, 1, 0})
    ->Args({20000, 0, 1})
    ->Iterations(1)
    ->Unit(benchmark::kMillisecond);

}  // namespace

BENCHMARK_MAIN();
