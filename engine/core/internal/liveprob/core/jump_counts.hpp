// How many jumps a uniformized chain makes over a horizon. With known rates the count is
// Poisson(Λτ). When every rate carries a common factor s ~ Gamma(shape, 1), as the strength
// mixture does once its scales are taken out (see pricing.cpp), the count is the Gamma mixture
// of Poisson(Λτ s): negative binomial with P(n) = Γ(shape+n)/(Γ(shape) n!) c^n / (1+c)^(shape+n),
// c = Λτ ("scale"). Integrating s out exactly this way leaves only the ratio of the two
// strengths to quadrature.
#pragma once

#include <cstddef>
#include <limits>
#include <span>

namespace liveprob::core {

struct JumpCounts {
    // Infinite shape: Poisson with mean `scale`. Otherwise negative binomial as above.
    double shape = std::numeric_limits<double>::infinity();
    double scale = 0.0;

    static JumpCounts poisson(double mean) noexcept {
        return {std::numeric_limits<double>::infinity(), mean};
    }
    static JumpCounts negative_binomial(double shape, double scale) noexcept {
        return {shape, scale};
    }
    bool is_poisson() const noexcept { return shape == std::numeric_limits<double>::infinity(); }

    // The count over a second horizon of scale `later_scale` that follows a first horizon of
    // this count's scale in which `earlier` jumps happened. Poisson: independent of the first.
    // Negative binomial: the Gamma factor's posterior after the first horizon,
    // NB(shape + earlier, later_scale / (1 + scale)).
    JumpCounts after(int earlier, double later_scale) const noexcept;
};

// The chains' truncation tolerance: the weighted mass (factor · P(N > n)) left out of a sum.
// Far below the quadrature's accuracy (engine/README.md) and, summed over the nodes, below the
// 1e-12 within which the published distributions must sum to 1.
inline constexpr double kJumpTailTolerance = 1e-14;

// Writes factor · P(N = n) for n = 0, 1, ... into `out` until the remaining weighted tail
// (bounded by a geometric series past the mode) is below kJumpTailTolerance; returns how many were
// written. Starts in log space so that an underflowing P(0) loses nothing. Should `out` fill
// first, the mass still missing is added to its last entry, so the weights always sum to
// `factor` (that happens only far outside the model's range: thousands of expected jumps).
std::size_t jump_weights(const JumpCounts& counts, double factor, std::span<double> out) noexcept;

}  // namespace liveprob::core
