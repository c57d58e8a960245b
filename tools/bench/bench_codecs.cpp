// Codec costs: decode/encode of inbound FlatBuffers and JSON lines, update encode/decode.
// Baseline: copying the same bytes into a fresh vector (the least any decoder must do).
// Run: liveprob_bench_codecs --benchmark_repetitions=10 --benchmark_report_aggregates_only=true
#include <benchmark/benchmark.h>

#include <algorithm>
#include <vector>

#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/json_feed.hpp"
#include "liveprob/protocol/update_codec.hpp"

namespace {

using namespace liveprob;

using namespace liveprob::core;
using namespace liveprob::protocol;

InboundMessage goal() {
    InboundMessage m;
    m.header = {7, 12, 1'790'000'000'000'000, {Period::second_half, 4'032'000}};
    m.body = Goal{Side::home, true, false};
    return m;
}

InboundMessage setup() {
    InboundMessage m;
    m.header = {7, 1, 1'790'000'000'000'000, {Period::pre_match, 0}};
    MatchSetup s;
    s.home_name = "Kestrel Vale";
    s.away_name = "Orrin Bay";
    s.prior = PriorMeans{1.42, 1.08};
    m.body = s;
    return m;
}

Outputs full_outputs() {
    Outputs o;
    o.status = MatchStatus::in_play;
    o.p_home = 0.4;
    o.p_draw = 0.3;
    o.p_away = 0.3;
    for (auto& row : o.goals_added) row.fill(1.0 / (kGrid * kGrid));
    return o;
}

double max_of(const std::vector<double>& v) { return *std::max_element(v.begin(), v.end()); }

void copy_baseline(benchmark::State& state) {
    const auto bytes = encode_feed_message(goal());
    for (auto _ : state) {
        std::vector<std::uint8_t> copy(bytes.begin(), bytes.end());
        benchmark::DoNotOptimize(copy.data());
    }
}

void decode_goal(benchmark::State& state) {
    const auto bytes = encode_feed_message(goal());
    for (auto _ : state) benchmark::DoNotOptimize(decode_feed_message(bytes));
}

void decode_setup(benchmark::State& state) {
    const auto bytes = encode_feed_message(setup());
    for (auto _ : state) benchmark::DoNotOptimize(decode_feed_message(bytes));
}

void encode_goal(benchmark::State& state) {
    const auto m = goal();
    for (auto _ : state) benchmark::DoNotOptimize(encode_feed_message(m));
}

void json_read_goal(benchmark::State& state) {
    const std::string line = to_json_line(goal());
    JsonFeedReader reader;
    for (auto _ : state) benchmark::DoNotOptimize(reader.read_line(line, 1));
}

void update_encode(benchmark::State& state) {
    UpdateEncoder encoder;
    const Outputs o = full_outputs();
    const UpdateMeta meta{7, 1, 12, 1, 2, 3};
    for (auto _ : state) benchmark::DoNotOptimize(encoder.encode(meta, o).data());
}

void update_decode(benchmark::State& state) {
    UpdateEncoder encoder;
    const auto span = encoder.encode({7, 1, 12, 1, 2, 3}, full_outputs());
    const std::vector<std::uint8_t> bytes(span.begin(), span.end());
    for (auto _ : state) benchmark::DoNotOptimize(decode_update(bytes));
}

}  // namespace

BENCHMARK(copy_baseline)->ComputeStatistics("max", max_of);
BENCHMARK(decode_goal)->ComputeStatistics("max", max_of);
BENCHMARK(decode_setup)->ComputeStatistics("max", max_of);
BENCHMARK(encode_goal)->ComputeStatistics("max", max_of);
BENCHMARK(json_read_goal)->ComputeStatistics("max", max_of);
BENCHMARK(update_encode)->ComputeStatistics("max", max_of);
BENCHMARK(update_decode)->ComputeStatistics("max", max_of);

BENCHMARK_MAIN();
