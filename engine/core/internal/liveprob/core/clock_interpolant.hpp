// Re-pricing between messages from an interpolant in the clock.
//
// Between two messages nothing but the clock moves, and within a stretch where the timing
// profile has no kink (TimingCurve::smooth_until_ms) every output is an analytic function of
// the clock: the remaining exposures are quadratic in it and the strength posterior follows
// the exposure so far. A polynomial through exact solves at Chebyshev points of such a window
// reproduces the exact solve to rounding: degree 12 holds every output within about 2e-13 of it
// over a whole 45-minute half (tests/unit/clock_interpolant_test.cpp measures it over thousands
// of windows). Evaluation is the barycentric formula (Berrut & Trefethen, "Barycentric Lagrange
// Interpolation", SIAM Review 46(3), 2004), at the nodes' actual clock readings (whole
// milliseconds), one pass over the nodes' stored outputs.
//
// The window's solves are spread: the host asks for one node per tick while the window fills
// (the tick itself is priced exactly meanwhile), then one more solve at a point between nodes
// checks the polynomial; a window whose check misses by more than kCheckTolerance is never
// used (counted), and the ticks in it stay exact.
#pragma once

#include <array>
#include <cstddef>
#include <cstdint>

#include "liveprob/core/messages.hpp"
#include "liveprob/core/outputs.hpp"

namespace liveprob::core {

class ClockInterpolant {
public:
    static constexpr std::size_t kNodes = 13;  // degree 12
    // Every probability, expected goals and the grid: the outputs that move with the clock.
    static constexpr std::size_t kValues = 10 + kTotalsLines + 1 + kGrid * kGrid + 1;
    using Values = std::array<double, kValues>;
    // A window shorter than this is priced exactly: its nodes would crowd into one tick.
    static constexpr std::uint32_t kShortestWindowMs = 5'000;
    // A longer smooth stretch is cut into windows this long: over a whole 45-minute half the
    // knock-out model's check misses 5e-13 by a hair (5.1e-13 at degree 12), over 15 minutes
    // it holds with room (tests/property/clock_interpolation_test.cpp).
    static constexpr std::uint32_t kLongestWindowMs = 15 * 60'000;
    // Largest difference at the check point for the window to be used.
    static constexpr double kCheckTolerance = 5e-13;

    // Starts a window over [from_ms, to_ms] of `period` for the fold state `epoch` (any change
    // of the fold that moves pricing other than through the clock starts a new one; a clock
    // sync does not once the window is ready). Allocation-free.
    void begin(std::uint64_t epoch, Period period, std::uint32_t from_ms, std::uint32_t to_ms);

    // Whether the current window was started for this state and holds this clock reading.
    [[nodiscard]] bool covers(std::uint64_t epoch, MatchClock clock) const noexcept;
    // Whether it can price: every node solved and the check passed.
    [[nodiscard]] bool ready() const noexcept { return phase_ == Phase::ready; }
    // Whether it still wants a solve, and at which clock reading.
    [[nodiscard]] bool wants_solve() const noexcept {
        return phase_ == Phase::filling || phase_ == Phase::checking;
    }
    [[nodiscard]] MatchClock next_solve() const noexcept;
    // Hands over the exact outputs at next_solve().
    void record(const Outputs& exact);

    // The interpolated outputs at `clock_ms` (inside the window; ready() only): every value in
    // kValues and has_advance. Status, clock, score and counts are the caller's to set.
    void evaluate(std::uint32_t clock_ms, Outputs& out) const noexcept;

    // Windows whose check failed, since construction (for tests and benchmarks).
    [[nodiscard]] std::uint64_t failed_checks() const noexcept { return failed_checks_; }

private:
    enum class Phase : std::uint8_t { none, filling, checking, ready, refused };

    double unit(std::uint32_t clock_ms) const noexcept;  // the window mapped onto [-1, 1]
    void combine(std::uint32_t clock_ms, Values& into) const noexcept;

    Phase phase_ = Phase::none;
    std::uint64_t epoch_ = 0;
    Period period_ = Period::pre_match;
    std::uint32_t from_ms_ = 0;
    std::uint32_t to_ms_ = 0;
    std::size_t solved_ = 0;
    bool has_advance_ = false;
    std::uint32_t check_ms_ = 0;
    std::uint64_t failed_checks_ = 0;
    std::array<std::uint32_t, kNodes> node_ms_{};
    std::array<double, kNodes> node_x_{};  // the nodes' readings mapped onto [-1, 1]
    std::array<double, kNodes> weight_{};  // barycentric weights of the nodes' actual readings
    std::array<Values, kNodes> values_{};
};

// The evaluation's hot loop (clock_interpolant_blend.cpp, with a fast clone: fast_clones.hpp):
// `into` = sum over the nodes of weight[j] * values[j].
void blend_nodes(const std::array<double, ClockInterpolant::kNodes>& weight,
                 const std::array<ClockInterpolant::Values, ClockInterpolant::kNodes>& values,
                 ClockInterpolant::Values& into) noexcept;

}  // namespace liveprob::core
