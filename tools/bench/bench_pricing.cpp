// One pricing update: the plain Poisson path (κ = ∞, no state effects) against the full model
// (score-state effects, a red card, Gamma strength mixture, knock-out with extra time and
// shoot-out; the argument is the number of quadrature nodes, 5 being the default). Each iteration
// moves the clock on by one second, as the runtime's timer does. Allocations are counted by a
// replaced global operator new and reported per update. The replaced operator new below hands out
// malloc() memory and operator delete frees it; at -O3 GCC inlines both into the benchmark
// registrations and mistakes the pair for a mismatch.
#pragma GCC diagnostic ignored "-Wmismatched-new-delete"

#include <benchmark/benchmark.h>

#include <atomic>
#include <cstdlib>
#include <limits>
#include <new>

#include "liveprob/core/intensity.hpp"
#include "liveprob/core/pricing.hpp"
#include "liveprob/core/score_chain.hpp"

namespace {
std::atomic<long> g_allocations{0};
}

void* operator new(std::size_t size) {
    g_allocations.fetch_add(1, std::memory_order_relaxed);
    if (void* p = std::malloc(size == 0 ? 1 : size)) return p;
    throw std::bad_alloc();
}
void operator delete(void* p) noexcept { std::free(p); }
void operator delete(void* p, std::size_t) noexcept { std::free(p); }

namespace {

using namespace liveprob;

using namespace liveprob::core;

PricingState base_state() {
    PricingState st;
    st.prior = {1.55, 1.15};
    st.status = MatchStatus::in_play;
    st.clock = {Period::first_half, 20 * 60'000};
    const double inf = std::numeric_limits<double>::infinity();
    st.theta_shape = {inf, inf};
    st.theta_rate = {inf, inf};
    return st;
}

void run(benchmark::State& state, const ModelParams& params, PricingState st) {
    PricingModel model(params);
    Outputs out;
    model.price(st, out);
    const long before = g_allocations.load();
    std::uint32_t tick = 0;
    for (auto _ : state) {
        // Sweep the clock from 20:00 through 29:59 so each update prices a fresh state.
        st.clock.clock_ms = 20 * 60'000 + (tick++ % 600) * 1000;
        model.price(st, out);
        benchmark::DoNotOptimize(out);
    }
    state.counters["allocs_per_update"] =
        benchmark::Counter(static_cast<double>(g_allocations.load() - before) /
                           static_cast<double>(state.iterations()));
}

void plain_poisson(benchmark::State& state) {
    run(state, ModelParams::plain_poisson(), base_state());
}

void full_model(benchmark::State& state) {
    ModelParams params;
    params.quadrature_nodes = static_cast<int>(state.range(0));
    PricingState st = base_state();
    st.goals = {1, 0};
    st.reds = {0, 1};
    st.format.extra_time = true;
    st.format.shootout = true;
    const StrengthPosterior h = strength_posterior(params, 1, 0.35);
    const StrengthPosterior a = strength_posterior(params, 0, 0.25);
    st.theta_shape = {h.shape, a.shape};
    st.theta_rate = {h.rate, a.rate};
    run(state, params, st);
}

// The same position in a league match: no extra time or shoot-out to price.
void full_model_league(benchmark::State& state) {
    ModelParams params;
    PricingState st = base_state();
    st.goals = {1, 0};
    st.reds = {0, 1};
    const StrengthPosterior h = strength_posterior(params, 1, 0.35);
    const StrengthPosterior a = strength_posterior(params, 0, 0.25);
    st.theta_shape = {h.shape, a.shape};
    st.theta_rate = {h.rate, a.rate};
    run(state, params, st);
}

// Score effects and red card on a κ = ∞ strength: the score chain alone, one solve.
void score_chain_only(benchmark::State& state) {
    ModelParams params;
    params.kappa = std::numeric_limits<double>::infinity();
    PricingState st = base_state();
    st.goals = {1, 0};
    st.reds = {0, 1};
    run(state, params, st);
}

}  // namespace

BENCHMARK(plain_poisson);
BENCHMARK(score_chain_only);
BENCHMARK(full_model)->Arg(5)->Arg(6)->Arg(8)->Arg(4);
BENCHMARK(full_model_league);

int main(int argc, char** argv) {
    benchmark::Initialize(&argc, argv);
    benchmark::AddCustomContext("score_chain_kernel", liveprob::core::score_chain_kernel());
    benchmark::RunSpecifiedBenchmarks();
    benchmark::Shutdown();
    return 0;
}
