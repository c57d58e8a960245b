#include "liveprob/core/score_chain.hpp"

#include <algorithm>
#include <cmath>

#include "liveprob/core/fast_clones.hpp"

namespace liveprob::core {
namespace {

constexpr int kSpan = kGrid;  // largest goal difference added that the grid holds
constexpr std::size_t kGridSize = static_cast<std::size_t>(kGrid);

std::size_t at(int k) { return static_cast<std::size_t>(k); }

// Per-jump probabilities of a home goal, an away goal and no goal (a self-loop of the
// uniformized chain) in each difference class.
struct StepProbabilities {
    std::array<double, kDiffClasses> home{}, away{}, stay{};
    StepProbabilities(const ClassRates& rates, double lam) {
        for (std::size_t c = 0; c < kDiffClasses; ++c) {
            home[c] = rates.home[c] / lam;
            away[c] = rates.away[c] / lam;
            stay[c] = 1.0 - home[c] - away[c];
        }
    }
};

// The chain on the goal difference alone: states -kSpan .. kSpan relative to the start (array
// index d + kSpan + 1, with an empty state either side), the two ends absorbing. Each state
// keeps `stay_` of its mass and receives `from_below_` of the state below (a home goal) and
// `from_above_` of the state above (an away goal), so a step is one branch-free pass.
class DifferenceChain {
public:
    DifferenceChain(const ClassRates& rates, int start_diff) : start_diff_(start_diff) {
        stay_.fill(1.0);
        const double lam = rates.max_total();
        if (lam > 0.0) {
            const StepProbabilities p(rates, lam);
            for (int d = -kSpan + 1; d < kSpan; ++d) {  // the ends keep stay = 1
                const auto c = at(diff_class(start_diff + d));
                stay_[slot(d)] = p.stay[c];
                from_below_[slot(d + 1)] = p.home[c];
                from_above_[slot(d - 1)] = p.away[c];
            }
        }
        now_[slot(0)] = 1.0;
    }
    void step() noexcept {
        std::array<double, kSlots> next{};
        for (std::size_t x = 1; x + 1 < kSlots; ++x) {
            next[x] =
                stay_[x] * now_[x] + from_below_[x] * now_[x - 1] + from_above_[x] * now_[x + 1];
        }
        now_ = next;
    }
    DifferenceOutcome outcome() const noexcept {
        // The tie start_diff + d is level at d = -start_diff: above it home is ahead.
        const int level_d = std::clamp(-start_diff_, -kSpan - 1, kSpan + 1);
        DifferenceOutcome out;
        for (int d = -kSpan; d < level_d; ++d) out.away_ahead += now_[slot(d)];
        for (int d = level_d + 1; d <= kSpan; ++d) out.home_ahead += now_[slot(d)];
        if (level_d >= -kSpan && level_d <= kSpan) out.level = now_[slot(level_d)];
        return out;
    }

private:
    static constexpr std::size_t kSlots = 2 * kSpan + 3;
    static std::size_t slot(int d) { return at(d + kSpan + 1); }
    int start_diff_;
    std::array<double, kSlots> stay_{}, from_below_{}, from_above_{}, now_{};
};

// Where ScoreChain's planes put their cells (score_chain.hpp; checked in add()).
constexpr std::size_t kStepStride = 24;
constexpr std::size_t kStepLeft = 4;
constexpr std::size_t kVector = 4;  // cells per chunk: one AVX2 vector
constexpr std::size_t kChunks = kGridSize / kVector;

// One jump (number n >= 1) of the uniformized chain over the plane, accumulating the new
// distribution with weight w. The hot loop of the whole engine. After n jumps only the cells
// with i + j <= n can hold mass (each jump adds one goal or none), so row i is computed in
// whole chunks of four cells up to column min(n - i, kGrid - 1): every chunk starts on a
// 32-byte boundary and the row's loop has no remainder. Cells past the triangle inside a
// chunk read only zeros and stay exactly zero. A cell's three coefficients are its diagonal's
// (stay, and the home and away probabilities of the cells that send to it: the diagonals
// either side), read from the 33-entry tables at the row's offset.
// The overflow buckets (row and column kGrid) can only receive mass from the 16th jump on;
// they keep everything (stay 1) and send nothing, so their update is v + p · (the cell that
// sends), written unfused: the products and sums the general formula would round, no more.
// Rounding is the same on every machine, so a replay reproduces live figures to the last bit:
// the fused multiply-adds are written out (std::fma is exactly rounded wherever it runs; the
// build contracts nothing else), and the loop has a fast clone (fast_clones.hpp) beside the
// baseline, where std::fma is a library call: correct, identical, several times slower.
LIVEPROB_FAST_CLONES
void uniformized_step(const double* __restrict stay, const double* __restrict home,
                      const double* __restrict away, const double* __restrict v,
                      double* __restrict nv, double* __restrict acc, double w, std::size_t n) {
    constexpr std::size_t stride = kStepStride;
    const std::size_t grid_rows = std::min(n, kGridSize - 1) + 1;
    for (std::size_t i = 0; i < grid_rows; ++i) {
        const std::size_t row = (i + 1) * stride + kStepLeft;
        const std::size_t cells = std::min((n - i) / kVector + 1, kChunks) * kVector;
        // Diagonal of cell (i, j): j - i + kGrid; the cell above lies one diagonal up, the
        // cell to the left one down.
        const double* s = stay + (kGridSize - i);
        const double* h = home + (kGridSize + 1 - i);
        const double* a = away + (kGridSize - 1 - i);
        const double* vr = v + row;
        const double* up = vr - stride;
        double* nr = nv + row;
        double* ar = acc + row;
        for (std::size_t j = 0; j < cells; ++j) {
            const double y = std::fma(s[j], vr[j], std::fma(h[j], up[j], a[j] * vr[j - 1]));
            nr[j] = y;
            ar[j] = std::fma(w, y, ar[j]);
        }
    }
    if (n < kGridSize) return;
    // Column j == kGrid, rows i <= n - kGrid: an away goal from (i, kGrid - 1).
    const std::size_t reach = std::min(n - kGridSize + 1, kGridSize);
    for (std::size_t i = 0; i < reach; ++i) {
        const std::size_t x = (i + 1) * stride + kStepLeft + kGridSize;
        const double y = v[x] + away[2 * kGridSize - 1 - i] * v[x - 1];
        nv[x] = y;
        acc[x] = std::fma(w, y, acc[x]);
    }
    // Row i == kGrid, columns j <= n - kGrid: a home goal from (kGrid - 1, j).
    const std::size_t last = (kGridSize + 1) * stride + kStepLeft;
    for (std::size_t j = 0; j < reach; ++j) {
        const std::size_t x = last + j;
        const double y = v[x] + home[j + 1] * v[x - stride];
        nv[x] = y;
        acc[x] = std::fma(w, y, acc[x]);
    }
}

// The passes of difference_values (below): values[n] is u_n at `start`, u_{n+1} = M u_n with
// M the difference chain's one-jump matrix (rows `stay`, `up`, `down`). Only the start's value
// is read, so u_n is needed only within (last n) - n slots of the start: each pass covers a
// narrower range. A fast clone like the chain step's; nothing here is fused (the build
// contracts nothing), so both clones round alike.
LIVEPROB_FAST_CLONES
void backward_passes(const double* __restrict stay, const double* __restrict up,
                     const double* __restrict down, double* __restrict u, double* __restrict next,
                     std::size_t start, std::size_t slots, double* __restrict values,
                     std::size_t count) {
    auto step = [&](const double* __restrict from, double* __restrict to, std::size_t reach) {
        const std::size_t lo = start > reach + 1 ? start - reach : 1;
        const std::size_t hi = std::min(start + reach, slots - 2);
        for (std::size_t x = lo; x <= hi; ++x) {
            to[x] = stay[x] * from[x] + up[x] * from[x + 1] + down[x] * from[x - 1];
        }
    };
    const std::size_t last = count == 0 ? 0 : count - 1;
    for (std::size_t n = 0; n < count; ++n) {
        if (n > 0) {
            if (n % 2 == 1) step(u, next, last - n);
            else step(next, u, last - n);
        }
        values[n] = (n % 2 == 1 ? next : u)[start];
    }
}

// Dispatched by the same rule as the step's clones, so it names the one that runs. (Versions of
// a function dispatch only where they are all visible: callers elsewhere use the wrapper.)
#if defined(LIVEPROB_HAS_FAST_CLONES)
__attribute__((target(LIVEPROB_FAST_CLONE))) const char* kernel_name() { return "x86-64-v3"; }
__attribute__((target("default"))) const char* kernel_name() { return "baseline"; }
#else
const char* kernel_name() { return "baseline"; }
#endif
}  // namespace

const char* score_chain_kernel() { return kernel_name(); }

double ClassRates::max_total() const noexcept {
    double lam = 0.0;
    for (std::size_t c = 0; c < kDiffClasses; ++c) lam = std::max(lam, home[c] + away[c]);
    return lam;
}

double ScoreGrid::overflow_total() const noexcept {
    double t = 0.0;
    for (std::size_t k = 0; k < kGridSize; ++k) t += home_overflow[k] + away_overflow[k];
    return t;
}

void ScoreChain::solve(const ClassRates& rates, int start_diff, double exposure, ScoreGrid& out) {
    out = ScoreGrid{};
    add(rates, start_diff, JumpCounts::poisson(rates.max_total() * std::max(exposure, 0.0)), 1.0,
        out);
}

void ScoreChain::set_step_probabilities(const ClassRates& rates, int start_diff) {
    const StepProbabilities p(rates, rates.max_total());
    // Diagonal m = j - i + kGrid: the home side's goal difference there is
    // start_diff + kGrid - m.
    for (std::size_t m = 0; m < kDiagonals; ++m) {
        const auto c = at(diff_class(start_diff + kGrid - static_cast<int>(m)));
        stay_[m] = p.stay[c];
        home_[m] = p.home[c];
        away_[m] = p.away[c];
    }
}

std::size_t ScoreChain::add(const ClassRates& rates, int start_diff, const JumpCounts& counts,
                            double weight, ScoreGrid& out, const int* level_diff) {
    const double lam = rates.max_total();
    // The level diagonal j = i - level_k, if asked for.
    const int level_k = level_diff ? *level_diff - start_diff : 0;
    const bool trace = level_diff != nullptr;
    level_count_ = 0;
    if (!(lam > 0.0) || !(counts.scale > 0.0)) {  // no goals can come
        out.cell[0][0] += weight;
        if (trace) level_[level_count_++] = level_k == 0 ? weight : 0.0;
        return 1;
    }
    static_assert(kStride == kStepStride && kLeft == kStepLeft && kStride >= kLeft + kGrid + 1);
    const std::size_t jumps = jump_weights(counts, weight, weights_);
    set_step_probabilities(rates, start_diff);

    // Cells not yet reachable must read zero: clear the rows this solve's jumps can reach (a
    // few kilobytes) rather than track what an earlier solve left behind. Rows past them are
    // neither read nor written below (they hold no mass).
    const std::size_t rows = std::min(jumps, kGridSize + 1) + 1;  // plane rows 0 .. rows - 1
    std::fill_n(a_.begin(), rows * kStride, 0.0);
    std::fill_n(b_.begin(), rows * kStride, 0.0);
    std::fill_n(sum_.begin(), rows * kStride, 0.0);
    // Where the level diagonal's cells (j = i - level_k) lie in a plane, by rising i, and how
    // many jumps reach each (i + j): after n jumps only a prefix of them can hold mass.
    std::array<std::size_t, kGridSize + 1> level_at{}, level_reached_after{};
    std::size_t level_cells = 0;
    for (int i = 0; trace && at(i) + 1 < rows; ++i) {
        const int j = i - level_k;
        if (j < 0 || j > kGrid) continue;
        level_at[level_cells] = cell_at(at(i), at(j));
        level_reached_after[level_cells++] = at(i + j);
    }
    std::size_t level_reached = 0;  // level cells that can hold mass now
    Plane* now = &a_;
    Plane* next = &b_;
    (*now)[cell_at(0, 0)] = 1.0;
    sum_[cell_at(0, 0)] = weights_[0];
    if (trace) level_[level_count_++] = level_k == 0 ? weights_[0] : 0.0;

    for (std::size_t n = 1; n < jumps; ++n) {
        const double w = weights_[n];
        uniformized_step(stay_.data(), home_.data(), away_.data(), now->data(), next->data(),
                         sum_.data(), w, n);
        if (trace) {
            const double* nv = next->data();
            while (level_reached < level_cells && level_reached_after[level_reached] <= n)
                ++level_reached;
            double level_mass = 0.0;  // the cells past the prefix hold exact zeros
            for (std::size_t c = 0; c < level_reached; ++c) level_mass += nv[level_at[c]];
            level_[level_count_++] = w * level_mass;
        }
        std::swap(now, next);
    }

    // Back to the grid and its overflow buckets.
    for (std::size_t i = 0; i + 1 < rows; ++i) {
        const double* row = &sum_[cell_at(i, 0)];
        if (i == kGridSize) {
            for (std::size_t j = 0; j < kGridSize; ++j) out.home_overflow[j] += row[j];
            continue;
        }
        for (std::size_t j = 0; j < kGridSize; ++j) out.cell[i][j] += row[j];
        out.away_overflow[i] += row[kGridSize];
    }
    return jumps;
}

void difference_values(const ClassRates& rates, int start_diff, double level_value,
                       std::span<double> out) {
    // Backwards: u_0 is the value of each difference, u_{n+1} = M u_n with M the one-jump
    // transition matrix, and the answer after n jumps is u_n at the start. One pass per n.
    constexpr int kSlots = 2 * kSpan + 3;  // differences -kSpan .. kSpan, an empty slot either side
    auto slot = [](int d) { return at(d + kSpan + 1); };
    std::array<double, kSlots> stay{}, up{}, down{}, u{}, next{};
    stay.fill(1.0);  // the absorbing ends and the empty slots keep their value
    const double lam = rates.max_total();
    if (lam > 0.0) {
        const StepProbabilities p(rates, lam);
        for (int d = -kSpan + 1; d < kSpan; ++d) {
            const auto c = at(diff_class(start_diff + d));
            stay[slot(d)] = p.stay[c];
            up[slot(d)] = p.home[c];
            down[slot(d)] = p.away[c];
        }
    }
    for (int d = -kSpan; d <= kSpan; ++d) {
        const int tie = start_diff + d;
        u[slot(d)] = tie > 0 ? 1.0 : tie == 0 ? level_value : 0.0;
    }
    backward_passes(stay.data(), up.data(), down.data(), u.data(), next.data(), slot(0), at(kSlots),
                    out.data(), out.size());
}

DifferenceOutcome solve_difference(const ClassRates& rates, int start_diff, double exposure) {
    std::array<double, kMaxJumps> weights{};
    const std::size_t jumps = jump_weights(
        JumpCounts::poisson(rates.max_total() * std::max(exposure, 0.0)), 1.0, weights);
    DifferenceChain chain(rates, start_diff);
    DifferenceOutcome sum;
    for (std::size_t n = 0; n < jumps; ++n) {
        if (n > 0) chain.step();
        const DifferenceOutcome o = chain.outcome();
        sum.home_ahead += weights[n] * o.home_ahead;
        sum.level += weights[n] * o.level;
        sum.away_ahead += weights[n] * o.away_ahead;
    }
    return sum;
}

}  // namespace liveprob::core
