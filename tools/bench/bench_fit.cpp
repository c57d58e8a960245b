// Rating-fit speed: one league season with decay and ρ, and the walk-forward refit of the whole
// international results file at monthly steps (warm-started). Needs the open data
// ($LIVEPROB_OPEN_DATA, or the copy in the repository, tests/data/open).
#include <benchmark/benchmark.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <string>

#include "liveprob/datasets/results_readers.hpp"
#include "liveprob/fit/calendar.hpp"
#include "liveprob/fit/dixon_coles.hpp"

namespace fit = liveprob::fit;

namespace {

std::filesystem::path open_data() {
    if (const char* env = std::getenv("LIVEPROB_OPEN_DATA")) return env;
    return std::filesystem::path(LIVEPROB_SOURCE_DIR) / "tests/data/open";
}

fit::RatingsFitOptions decayed() {
    fit::RatingsFitOptions o;
    o.xi = std::log(2.0) / 240.0;
    o.fit_rho = true;
    o.min_matches = 6.0;
    return o;
}

// Baseline in the same run: the plain Poisson fit (no decay, no ρ) of the same season.
void BM_LeagueSeasonPlain(benchmark::State& state) {
    const auto games =
        liveprob::datasets::read_league_json((open_data() / "leagues/2018-19/es.1.json").string())
            .matches;
    fit::RatingsFitOptions o;
    for (auto _ : state) benchmark::DoNotOptimize(fit::fit_ratings(games, o));
}

void BM_LeagueSeasonDecayRho(benchmark::State& state) {
    const auto games =
        liveprob::datasets::read_league_json((open_data() / "leagues/2018-19/es.1.json").string())
            .matches;
    const auto o = decayed();
    for (auto _ : state) benchmark::DoNotOptimize(fit::fit_ratings(games, o));
    state.counters["matches"] = static_cast<double>(games.size());
}

// Every month from January of the benchmark's argument (a year) to December 2015: fit on
// everything before the month's first day.
void BM_InternationalMonthlyWalkForward(benchmark::State& state) {
    const auto games = liveprob::datasets::read_international_results(
                           (open_data() / "international/results.csv").string())
                           .matches;
    for (auto _ : state) {
        fit::RatingsFitOptions o;
        o.xi = std::log(2.0) / (2.0 * 365.0);
        o.min_matches = 6.0;
        o.min_weight = 0.01;
        o.standard_errors = false;
        std::optional<fit::Ratings> previous;
        int refits = 0, newton_iterations = 0, not_converged = 0;
        for (int year = static_cast<int>(state.range(0)); year <= 2015; ++year)
            for (int month = 1; month <= 12; ++month) {
                o.as_of_day = fit::day_number(year, month, 1);
                o.start = previous ? &*previous : nullptr;
                previous = fit::fit_ratings(games, o);
                ++refits;
                newton_iterations += previous->diagnostics.iterations;
                not_converged += previous->diagnostics.converged ? 0 : 1;
            }
        state.counters["refits"] = refits;
        state.counters["newton_iterations"] = newton_iterations;
        state.counters["not_converged"] = not_converged;
    }
}

}  // namespace

BENCHMARK(BM_LeagueSeasonPlain)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_LeagueSeasonDecayRho)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_InternationalMonthlyWalkForward)
    ->Arg(2013)
    ->Arg(1873)
    ->Unit(benchmark::kSecond)
    ->Iterations(1)
    ->Repetitions(3)
    ->ReportAggregatesOnly(true);

BENCHMARK_MAIN();
