// The score process from now on as a continuous-time Markov chain on the grid of goals added,
// in operational time (exposure): with r(t) common to both sides, the rates per unit exposure
// are constant between events, so one transient solution covers the rest of a period range.
// Solved by uniformization (Jensen's method): P(τ) = Σ_n Pois(n; Λτ) (I + Q/Λ)^n, truncated
// where the Poisson remainder is below 1e-16. Mass that would leave the grid is kept in
// overflow buckets, so grid + overflow sums to 1.
#pragma once

#include <array>

#include "liveprob/engine/outputs.hpp"

namespace liveprob {

// A side's scoring rate per unit exposure depends on the state only through the sign of the
// home side's goal difference: index 0 home trailing, 1 level, 2 home leading.
inline constexpr int kDiffClasses = 3;
constexpr int diff_class(int home_diff) noexcept { return home_diff < 0 ? 0 : home_diff == 0 ? 1 : 2; }

struct ClassRates {
    std::array<double, kDiffClasses> home{};
    std::array<double, kDiffClasses> away{};
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

class ScoreChain {
public:
    // Distribution of goals added over `exposure`, from (0, 0), where cell (i, j) has home
    // goal difference start_diff + i - j. Allocates nothing.
    void solve(const ClassRates& rates, int start_diff, double exposure, ScoreGrid& out);

private:
    using Plane = std::array<std::array<double, kGrid + 1>, kGrid + 1>;  // row/column 0 = padding
    Plane stay_{}, home_go_{}, away_go_{};
    Plane now_{}, next_{};
};

// Final goal difference only (a chain on the difference; margins beyond ±kGrid are absorbed
// and counted with their side). Used for extra time, which starts level.
struct DifferenceOutcome {
    double home_ahead = 0.0;
    double level = 0.0;
    double away_ahead = 0.0;
};
DifferenceOutcome solve_difference(const ClassRates& rates, int start_diff, double exposure);

}  // namespace liveprob
