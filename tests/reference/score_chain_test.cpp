// The uniformized score chain against independent solutions of the same Markov chain:
//  - constant rates: Eigen's matrix exponential of the generator (unsupported/Eigen/
//    MatrixFunctions, scaling and squaring with Padé approximants);
//  - time-varying rates r(t) on the real clock: a classical fourth-order Runge–Kutta
//    integration with small steps.
// Every probability (grid cells and overflow buckets) within 1e-9.
// test-build: optimised (Eigen's matrix exponential; its SSE prefetch only compiles optimised)
#include <catch2/catch.hpp>
#include <unsupported/Eigen/MatrixFunctions>

#include <Eigen/Dense>

#include <cmath>
#include <vector>

#include "liveprob/core/intensity.hpp"
#include "liveprob/core/score_chain.hpp"
#include "liveprob/core/timing.hpp"

using namespace liveprob;

using namespace liveprob::core;

namespace {

// State numbering for the reference generator: grid cells, then the overflow buckets.
constexpr int kCells = kGrid * kGrid;
constexpr int kStates = kCells + 2 * kGrid;
int cell(int i, int j) { return i * kGrid + j; }
int home_overflow(int j) { return kCells + j; }
int away_overflow(int i) { return kCells + kGrid + i; }

// Generator Q (row = from, column = to) of the chain on goals added.
Eigen::MatrixXd generator(const ClassRates& r, int start_diff) {
    Eigen::MatrixXd q = Eigen::MatrixXd::Zero(kStates, kStates);
    for (int i = 0; i < kGrid; ++i) {
        for (int j = 0; j < kGrid; ++j) {
            const auto c = static_cast<std::size_t>(diff_class(start_diff + i - j));
            const int from = cell(i, j);
            q(from, i + 1 < kGrid ? cell(i + 1, j) : home_overflow(j)) += r.home[c];
            q(from, j + 1 < kGrid ? cell(i, j + 1) : away_overflow(i)) += r.away[c];
            q(from, from) -= r.home[c] + r.away[c];
        }
    }
    return q;
}

void require_close(const Eigen::VectorXd& p, const ScoreGrid& g, double tol) {
    double worst = 0.0;
    for (int i = 0; i < kGrid; ++i) {
        for (int j = 0; j < kGrid; ++j) {
            worst = std::max(
                worst, std::abs(p(cell(i, j)) -
                                g.cell[static_cast<std::size_t>(i)][static_cast<std::size_t>(j)]));
        }
        worst = std::max(
            worst, std::abs(p(home_overflow(i)) - g.home_overflow[static_cast<std::size_t>(i)]));
        worst = std::max(
            worst, std::abs(p(away_overflow(i)) - g.away_overflow[static_cast<std::size_t>(i)]));
    }
    INFO("largest difference " << worst);
    CHECK(worst <= tol);
}

ClassRates effects_rates(double lambda_h, double lambda_a, int reds_h, int reds_a) {
    const ModelParams params;  // default score-state and red-card effects
    ClassRates r;
    for (int c = 0; c < kDiffClasses; ++c) {
        r.home[static_cast<std::size_t>(c)] =
            lambda_h * state_multiplier(params, Side::home, c - 1, reds_h, reds_a);
        r.away[static_cast<std::size_t>(c)] =
            lambda_a * state_multiplier(params, Side::away, 1 - c, reds_a, reds_h);
    }
    return r;
}

}  // namespace

TEST_CASE("score chain equals Eigen's matrix exponential of the generator on constant rates") {
    struct Piece {
        double lh, la;
        int rh, ra, start_diff;
        double exposure;
    };
    const Piece pieces[] = {
        {1.5, 1.1, 0, 0, 0, 1.0},   // whole match from kick-off
        {2.8, 2.2, 0, 1, -1, 1.0},  // high-scoring, away a man down and leading
        {1.2, 1.4, 2, 0, 2, 0.35},  // home two men down, two up
        {6.0, 5.5, 0, 0, 0, 1.6},   // much mass leaves the grid
        {1.4, 1.0, 0, 0, 1, 0.02},  // late in the match
    };
    ScoreChain chain;
    ScoreGrid grid;
    for (const Piece& pc : pieces) {
        const ClassRates r = effects_rates(pc.lh, pc.la, pc.rh, pc.ra);
        chain.solve(r, pc.start_diff, pc.exposure, grid);
        const Eigen::MatrixXd transition = (generator(r, pc.start_diff) * pc.exposure).exp();
        const Eigen::VectorXd p = transition.row(cell(0, 0)).transpose();
        require_close(p, grid, 1e-9);
    }
}

TEST_CASE("score chain in exposure equals a fine-step Runge-Kutta solution on the real clock") {
    // dp/dt = r(t) p Q on the clock of a match from 30:00 of the first half to the end, r(t)
    // from the timing curve (rising rate, stoppage at the end of each half). The chain solves
    // it in operational time τ = ∫ r dt.
    const ModelParams params;
    const CompetitionFormat format;
    const TimingCurve curve(params.timing, format);
    const ClassRates r = effects_rates(1.7, 1.2, 0, 1);
    const int start_diff = 1;
    const Eigen::MatrixXd qt = generator(r, start_diff).transpose();
    Eigen::VectorXd p = Eigen::VectorXd::Zero(kStates);
    p(cell(0, 0)) = 1.0;
    auto run = [&](Period period, double from_min, double to_min) {
        constexpr double kStep = 0.02;  // minutes
        const int steps = static_cast<int>(std::ceil((to_min - from_min) / kStep));
        const double h = (to_min - from_min) / steps;
        auto rate_at = [&](double t) {
            return curve.rate({period, static_cast<std::uint32_t>(std::lround(t * 60'000.0))});
        };
        // r jumps to the stoppage rate at the nominal end: the last stage takes the limit from
        // the left, extrapolated exactly from two readings before it (r is linear there).
        auto rate_before_end = [&](double t) {
            if (std::lround(t * 60'000.0) < std::lround(to_min * 60'000.0)) return rate_at(t);
            constexpr double kMs = 1.0 / 60'000.0;
            return 2.0 * rate_at(to_min - kMs) - rate_at(to_min - 2.0 * kMs);
        };
        for (int s = 0; s < steps; ++s) {
            const double t = from_min + s * h;
            // r(t) is piecewise linear, so evaluate it exactly at each stage time.
            const double r0 = rate_at(t), r1 = rate_at(t + h / 2), r2 = rate_before_end(t + h);
            const Eigen::VectorXd k1 = r0 * (qt * p);
            const Eigen::VectorXd k2 = r1 * (qt * (p + h / 2 * k1));
            const Eigen::VectorXd k3 = r1 * (qt * (p + h / 2 * k2));
            const Eigen::VectorXd k4 = r2 * (qt * (p + h * k3));
            p += h / 6 * (k1 + 2 * k2 + 2 * k3 + k4);
        }
    };
    const double half = format.half_minutes;
    run(Period::first_half, 30.0, half);
    run(Period::first_half, half, half + params.timing.expected_stoppage_first);
    run(Period::second_half, half, 2 * half);
    run(Period::second_half, 2 * half, 2 * half + params.timing.expected_stoppage_second);

    const double tau = curve.remaining_regulation({Period::first_half, 30 * 60'000}, std::nullopt);
    ScoreChain chain;
    ScoreGrid grid;
    chain.solve(r, start_diff, tau, grid);
    require_close(p, grid, 1e-9);
}

TEST_CASE("goal-difference chain agrees with the full score chain") {
    const ClassRates r = effects_rates(1.3, 1.6, 1, 0);
    ScoreChain chain;
    ScoreGrid grid;
    chain.solve(r, 0, 0.3, grid);
    double ahead = 0, level = 0, behind = 0;
    for (int i = 0; i < kGrid; ++i) {
        for (int j = 0; j < kGrid; ++j) {
            const double v = grid.cell[static_cast<std::size_t>(i)][static_cast<std::size_t>(j)];
            (i > j ? ahead : i < j ? behind : level) += v;
        }
    }
    const DifferenceOutcome d = solve_difference(r, 0, 0.3);
    // Differences only matter beyond the grid, whose mass here is far below the tolerance.
    CHECK(d.home_ahead == Approx(ahead).margin(1e-12));
    CHECK(d.level == Approx(level).margin(1e-12));
    CHECK(d.away_ahead == Approx(behind).margin(1e-12));
}
