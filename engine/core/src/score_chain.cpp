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

constexpr std::size_t kStepWidth = kGridSize + 2;  // ScoreChain's plane width (checked in add())

// One jump (number n >= 1) of the uniformized chain over the plane, accumulating the new
// distribution with weight w. The hot loop of the whole engine: one branch-free pass, so that
// it vectorizes. Rows past n cannot hold mass yet and are left alone; within a row every cell
// is computed (a shorter, ragged range would cost more in loop overhead than it saves).
// Rounding is the same on every machine, so a replay reproduces live figures to the last bit:
// the fused multiply-adds are written out (std::fma is exactly rounded wherever it runs), and
// the loop has a fast clone (fast_clones.hpp) beside the baseline, where std::fma is a library
// call: correct, identical, several times slower.
LIVEPROB_FAST_CLONES
void uniformized_step(const double* __restrict stay, const double* __restrict from_home,
                      const double* __restrict from_away, const double* __restrict v,
                      double* __restrict nv, double* __restrict acc, double w, std::size_t n) {
    constexpr std::size_t width = kStepWidth;
    const std::size_t end = (std::min(n, kGridSize) + 2) * width;
    for (std::size_t x = width; x < end; ++x) {
        const double y =
            std::fma(stay[x], v[x], std::fma(from_home[x], v[x - width], from_away[x] * v[x - 1]));
        nv[x] = y;
        acc[x] = std::fma(w, y, acc[x]);
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
    // By m = j - i + kGrid (0 .. 2 kGrid), the diagonal a cell lies on: the home side's goal
    // difference there is start_diff + kGrid - m.
    constexpr std::size_t kDiagonals = 2 * kGridSize + 1;
    std::array<double, kDiagonals> stay{}, home{}, away{};
    for (std::size_t m = 0; m < kDiagonals; ++m) {
        const auto c = at(diff_class(start_diff + kGrid - static_cast<int>(m)));
        stay[m] = p.stay[c];
        home[m] = p.home[c];
        away[m] = p.away[c];
    }
    // Row i holds diagonals m = kGrid - i .. 2 kGrid - i, in order: contiguous copies.
    for (std::size_t i = 0; i <= kGridSize; ++i) {
        const std::size_t m0 = kGridSize - i;
        double* s_row = &stay_[(i + 1) * kWidth + 1];
        double* h_row = &from_home_[(i + 1) * kWidth + 1];
        double* a_row = &from_away_[(i + 1) * kWidth + 1];
        std::copy_n(&stay[m0], kGridSize + 1, s_row);
        // From (i - 1, j) by a home goal (diagonal m + 1), from (i, j - 1) by an away goal
        // (diagonal m - 1), only from grid cells: overflow buckets send nothing.
        if (i > 0) std::copy_n(&home[m0 + 1], kGridSize, h_row);
        if (i < kGridSize) std::copy_n(&away[m0], kGridSize, a_row + 1);
        s_row[kGridSize] = 1.0;  // column j == kGrid: overflow bucket
    }
    std::fill_n(&stay_[(kGridSize + 1) * kWidth + 1], kGridSize + 1, 1.0);  // row i == kGrid
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
    static_assert(kWidth == kStepWidth);
    const std::size_t jumps = jump_weights(counts, weight, weights_);
    set_step_probabilities(rates, start_diff);

    // Cells not yet reachable must read zero: clear the planes (a few kilobytes) rather than
    // track what an earlier solve left behind.
    a_.fill(0.0);
    b_.fill(0.0);
    sum_.fill(0.0);
    // Where the level diagonal's cells (j = i - level_k) lie in a plane.
    std::array<std::size_t, kGridSize + 1> level_at{};
    std::size_t level_cells = 0;
    for (int i = 0; trace && i <= kGrid; ++i) {
        const int j = i - level_k;
        if (j >= 0 && j <= kGrid) level_at[level_cells++] = (at(i) + 1) * kWidth + at(j) + 1;
    }
    Plane* now = &a_;
    Plane* next = &b_;
    (*now)[kWidth + 1] = 1.0;  // (0, 0)
    sum_[kWidth + 1] = weights_[0];
    if (trace) level_[level_count_++] = level_k == 0 ? weights_[0] : 0.0;

    for (std::size_t n = 1; n < jumps; ++n) {
        const double w = weights_[n];
        uniformized_step(stay_.data(), from_home_.data(), from_away_.data(), now->data(),
                         next->data(), sum_.data(), w, n);
        if (trace) {
            const double* nv = next->data();
            double level_mass = 0.0;
            for (std::size_t c = 0; c < level_cells; ++c) level_mass += nv[level_at[c]];
            level_[level_count_++] = w * level_mass;
        }
        std::swap(now, next);
    }

    // Back to the grid and its overflow buckets.
    for (std::size_t i = 0; i <= kGridSize; ++i) {
        const double* row = &sum_[(i + 1) * kWidth + 1];
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
    // Only the start's value is read, so u_n is needed only within (last n) - n slots of the
    // start: each pass covers a narrower range.
    const std::size_t last = out.empty() ? 0 : out.size() - 1;
    auto step = [&](const double* __restrict from, double* __restrict to, std::size_t reach) {
        const std::size_t lo = slot(0) > reach + 1 ? slot(0) - reach : 1;
        const std::size_t hi = std::min(slot(0) + reach, at(kSlots) - 2);
        for (std::size_t x = lo; x <= hi; ++x) {
            to[x] = stay[x] * from[x] + up[x] * from[x + 1] + down[x] * from[x - 1];
        }
    };
    for (std::size_t n = 0; n < out.size(); ++n) {
        if (n > 0) {
            if (n % 2 == 1) step(u.data(), next.data(), last - n);
            else step(next.data(), u.data(), last - n);
        }
        out[n] = (n % 2 == 1 ? next : u)[slot(0)];
    }
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
