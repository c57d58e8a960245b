#include "liveprob/engine/score_chain.hpp"

#include <algorithm>
#include <cmath>

namespace liveprob {
namespace {

// Poisson weights are summed until the remainder is below this; each chunk of uniformization
// covers at most kMaxChunkMean expected jumps so that exp(-m) never underflows.
constexpr double kPoissonRemainder = 1e-16;
constexpr double kMaxChunkMean = 200.0;

// Poisson remainder bound after term n (n + 1 > m): Σ_{k>n} p_k <= p_n q / (1 - q), q = m/(n+2).
bool remainder_small(double p_n, double m, int n) {
    const double q = m / (n + 2);
    return q < 1.0 && p_n * q / (1.0 - q) < kPoissonRemainder;
}

double max_total_rate(const ClassRates& r) {
    double lam = 0.0;
    for (int c = 0; c < kDiffClasses; ++c) lam = std::max(lam, r.home[static_cast<std::size_t>(c)] + r.away[static_cast<std::size_t>(c)]);
    return lam;
}

}  // namespace

double ScoreGrid::overflow_total() const noexcept {
    double t = 0.0;
    for (int k = 0; k < kGrid; ++k) t += home_overflow[static_cast<std::size_t>(k)] + away_overflow[static_cast<std::size_t>(k)];
    return t;
}

void ScoreChain::solve(const ClassRates& rates, int start_diff, double exposure, ScoreGrid& out) {
    out = ScoreGrid{};
    const double lam = max_total_rate(rates);
    if (!(exposure > 0.0) || !(lam > 0.0)) {
        out.cell[0][0] = 1.0;
        return;
    }
    for (auto* plane : {&stay_, &home_go_, &away_go_, &now_}) {
        for (auto& row : *plane) row.fill(0.0);
    }
    std::array<double, kDiffClasses> home_step{}, away_step{}, stay_step{};
    for (std::size_t c = 0; c < kDiffClasses; ++c) {
        home_step[c] = rates.home[c] / lam;
        away_step[c] = rates.away[c] / lam;
        stay_step[c] = 1.0 - home_step[c] - away_step[c];
    }
    for (int i = 0; i < kGrid; ++i) {
        for (int j = 0; j < kGrid; ++j) {
            const auto c = static_cast<std::size_t>(diff_class(start_diff + i - j));
            const auto pi = static_cast<std::size_t>(i + 1);
            const auto pj = static_cast<std::size_t>(j + 1);
            home_go_[pi][pj] = home_step[c];
            away_go_[pi][pj] = away_step[c];
            stay_[pi][pj] = stay_step[c];
        }
    }
    now_[1][1] = 1.0;
    std::array<double, kGrid> home_leak{}, away_leak{};  // cumulative overflow, absorbing
    int reach = 0;  // largest i + j that can hold mass
    double remaining = lam * exposure;
    while (remaining > 0.0) {
        const double m = std::min(remaining, kMaxChunkMean);
        remaining -= m;
        Plane& acc = next_;  // accumulates Σ p_n v_n for this chunk
        std::array<double, kGrid> chunk_home{}, chunk_away{};
        double p = std::exp(-m);
        for (auto& row : acc) row.fill(0.0);
        // Σ p_n v_n: the first term here, later ones inside the step loop.
        for (std::size_t k = 0; k < kGrid; ++k) {
            chunk_home[k] = p * home_leak[k];
            chunk_away[k] = p * away_leak[k];
        }
        {
            const int rows = std::min(reach, kGrid - 1);
            for (int i = 0; i <= rows; ++i) {
                const auto pi = static_cast<std::size_t>(i + 1);
                const int cols = std::min(reach - i, kGrid - 1);
                for (int j = 0; j <= cols; ++j) acc[pi][static_cast<std::size_t>(j + 1)] = p * now_[pi][static_cast<std::size_t>(j + 1)];
            }
        }
        for (int n = 0;; ++n) {
            // One uniformized step, v <- v (I + Q/Λ), in place from the far corner back so
            // every read sees the previous step's values; the new values are accumulated
            // with their Poisson weight in the same pass.
            p *= m / (n + 1);
            const int new_reach = std::min(reach + 1, 2 * (kGrid - 1));
            for (std::size_t j = 0; j < kGrid; ++j) {
                home_leak[j] += home_go_[kGrid][j + 1] * now_[kGrid][j + 1];
                away_leak[j] += away_go_[j + 1][kGrid] * now_[j + 1][kGrid];
                chunk_home[j] += p * home_leak[j];
                chunk_away[j] += p * away_leak[j];
            }
            const int rows = std::min(new_reach, kGrid - 1);
            for (int i = rows; i >= 0; --i) {
                const auto pi = static_cast<std::size_t>(i + 1);
                const int cols = std::min(new_reach - i, kGrid - 1);
                auto& row = now_[pi];
                auto& sum = acc[pi];
                const auto& up = now_[pi - 1];
                const auto& s = stay_[pi];
                const auto& h = home_go_[pi - 1];
                const auto& a = away_go_[pi];
                for (int jj = cols; jj >= 0; --jj) {
                    const auto pj = static_cast<std::size_t>(jj + 1);
                    const double v = s[pj] * row[pj] + h[pj] * up[pj] + a[pj - 1] * row[pj - 1];
                    row[pj] = v;
                    sum[pj] += p * v;
                }
            }
            reach = new_reach;
            if (n + 1 > m && remainder_small(p, m, n + 1)) break;
        }
        now_ = acc;
        home_leak = chunk_home;
        away_leak = chunk_away;
        reach = 2 * (kGrid - 1);
    }
    for (std::size_t i = 0; i < kGrid; ++i) {
        for (std::size_t j = 0; j < kGrid; ++j) out.cell[i][j] = now_[i + 1][j + 1];
    }
    out.home_overflow = home_leak;
    out.away_overflow = away_leak;
}

DifferenceOutcome solve_difference(const ClassRates& rates, int start_diff, double exposure) {
    // States: difference -kGrid .. +kGrid relative to the start; the two ends absorb.
    constexpr int kSpan = kGrid;
    constexpr int kStates = 2 * kSpan + 1;
    std::array<double, kStates> now{}, acc{};
    now[kSpan] = 1.0;
    DifferenceOutcome out;
    const double lam = max_total_rate(rates);
    if (!(exposure > 0.0) || !(lam > 0.0)) {
        acc = now;
    } else {
        std::array<double, kStates> up{}, down{};
        for (int s = 1; s + 1 < kStates; ++s) {
            const auto c = static_cast<std::size_t>(diff_class(start_diff + s - kSpan));
            up[static_cast<std::size_t>(s)] = rates.home[c] / lam;
            down[static_cast<std::size_t>(s)] = rates.away[c] / lam;
        }
        double remaining = lam * exposure;
        while (remaining > 0.0) {
            const double m = std::min(remaining, kMaxChunkMean);
            remaining -= m;
            double p = std::exp(-m);
            acc.fill(0.0);
            for (std::size_t s = 0; s < kStates; ++s) acc[s] += p * now[s];
            for (int n = 0;; ++n) {
                std::array<double, kStates> next{};
                for (std::size_t s = 0; s < kStates; ++s) {
                    const double v = now[s];
                    next[s] += v * (1.0 - up[s] - down[s]);  // ends: up = down = 0, absorbing
                    if (s + 1 < kStates) next[s + 1] += v * up[s];
                    if (s > 0) next[s - 1] += v * down[s];
                }
                now = next;
                p *= m / (n + 1);
                for (std::size_t s = 0; s < kStates; ++s) acc[s] += p * now[s];
                if (n + 1 > m && remainder_small(p, m, n + 1)) break;
            }
            now = acc;
        }
    }
    for (int s = 0; s < kStates; ++s) {
        const int d = start_diff + s - kSpan;
        const double v = acc[static_cast<std::size_t>(s)];
        if (d > 0) out.home_ahead += v;
        else if (d < 0) out.away_ahead += v;
        else out.level += v;
    }
    return out;
}

}  // namespace liveprob
