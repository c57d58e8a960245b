// The score process from now on as a continuous-time Markov chain on the grid of goals added,
// in operational time (exposure): with r(t) common to both sides, the rates per unit exposure
// are constant between events, so one transient solution covers the rest of a period range.
// Solved by uniformization (Jensen's method): P = Σ_n P(N = n) (I + Q/Λ)^n, N the number of
// jumps of a clock of rate Λ (the largest total rate) over the horizon — Poisson when the
// rates are known, negative binomial when they share a Gamma-distributed factor
// (jump_counts.hpp). The sum stops once the count's remaining tail is below 1e-16. Mass that
// would leave the grid is kept in overflow buckets, so grid + overflow sums to 1.
#pragma once

#include <array>
#include <cstddef>
#include <span>

#include "liveprob/core/jump_counts.hpp"
#include "liveprob/core/outputs.hpp"

namespace liveprob::core {

// A side's scoring rate per unit exposure depends on the state only through the sign of the
// home side's goal difference: index 0 home trailing, 1 level, 2 home leading.
inline constexpr int kDiffClasses = 3;
constexpr int diff_class(int home_diff) noexcept {
    return home_diff < 0 ? 0 : home_diff == 0 ? 1 : 2;
}

struct ClassRates {
    std::array<double, kDiffClasses> home{};
    std::array<double, kDiffClasses> away{};
    // Λ: the largest total rate over the classes, the uniformization rate.
    double max_total() const noexcept;
};

struct ScoreGrid {
    // cell[i][j] = P(home adds i, away adds j) over the horizon.
    std::array<std::array<double, kGrid>, kGrid> cell{};
    // Mass that left the grid: by a home goal while away had added j (home_overflow[j]), and
    // by an away goal while home had added i (away_overflow[i]). Absorbing: later goals are
    // not followed.
    std::array<double, kGrid> home_overflow{};
    std::array<double, kGrid> away_overflow{};
    double overflow_total() const noexcept;
};

// Most jumps one solve follows; the count distributions stop long before this in the model's
// range (see jump_weights for what happens beyond).
inline constexpr std::size_t kMaxJumps = 4096;

class ScoreChain {
public:
    // Distribution of goals added over `exposure`, from (0, 0), where cell (i, j) has home
    // goal difference start_diff + i - j; the rates are known. Allocates nothing.
    void solve(const ClassRates& rates, int start_diff, double exposure, ScoreGrid& out);

    // Adds weight · Σ_n P(N = n) v_n to `out`, v_n the distribution after n jumps of the chain
    // uniformized at Λ = rates.max_total(), N ~ `counts` (whose scale must be Λ times the
    // horizon). When `level_diff` is given, also records for each n the weighted mass
    // weight · P(N = n) · v_n(level) on the cells where start_diff + i - j == level_diff
    // (overflow buckets counted where they left the grid): see level_trace(). Returns the
    // number of jump counts summed.
    std::size_t add(const ClassRates& rates, int start_diff, const JumpCounts& counts,
                    double weight, ScoreGrid& out, const int* level_diff = nullptr);

    // After add() with a level_diff: entry n is weight · P(N = n) · (mass on the level
    // diagonal after n jumps).
    std::span<const double> level_trace() const noexcept { return {level_.data(), level_count_}; }

private:
    // Cells by rows of home goals added: cell (i, j) at row i + 1, column j + kLeft of a plane.
    // Row 0 and the columns left of kLeft stay zero, so that the first row's and column's
    // neighbours read zero; a row is kStride doubles (a multiple of 32 bytes), so every row's
    // grid cells j = 0 .. kGrid - 1 start on a 32-byte boundary and fill four vectors of four.
    // Row i == kGrid and column j == kGrid hold the overflow buckets (absorbing).
    static constexpr std::size_t kLeft = 4;
    static constexpr std::size_t kStride = 24;
    static constexpr std::size_t kRows = kGrid + 2;
    using Plane = std::array<double, kRows * kStride>;
    static constexpr std::size_t cell_at(std::size_t i, std::size_t j) {
        return (i + 1) * kStride + kLeft + j;
    }
    // Per-jump probabilities by the diagonal m = j - i + kGrid (0 .. 2 kGrid) a cell lies on: a
    // cell's class, hence its coefficients, depends on its diagonal alone.
    static constexpr std::size_t kDiagonals = 2 * kGrid + 1;
    using Diagonals = std::array<double, kDiagonals>;
    void set_step_probabilities(const ClassRates& rates, int start_diff);

    Diagonals stay_{};
    Diagonals home_{};
    Diagonals away_{};
    alignas(64) Plane a_{};
    alignas(64) Plane b_{};
    alignas(64) Plane sum_{};
    std::array<double, kMaxJumps> weights_{};
    std::array<double, kMaxJumps> level_{};
    std::size_t level_count_ = 0;
};

// Final goal difference of a chain on the difference alone, started at start_diff; margins
// beyond ±kGrid are absorbed and counted with their side. Used for extra time.
struct DifferenceOutcome {
    double home_ahead = 0.0;
    double level = 0.0;
    double away_ahead = 0.0;
};

// For n = 0 .. out.size()-1: the expected value after n jumps of the difference chain
// uniformized at rates.max_total() and started at start_diff, of 1 when the home side is
// ahead, `level_value` when level, 0 when behind. (Extra time: a level tie goes to the
// shoot-out, which the home side wins with probability level_value.) Allocates nothing.
void difference_values(const ClassRates& rates, int start_diff, double level_value,
                       std::span<double> out);

// Which compiled form of the chain step this processor runs: "x86-64-v3" (AVX2 with FMA) or
// "baseline" (the same figures, several times slower). For benchmarks and checks.
const char* score_chain_kernel();

// Outcome over `exposure` with known rates (Poisson jump count).
DifferenceOutcome solve_difference(const ClassRates& rates, int start_diff, double exposure);

}  // namespace liveprob::core
