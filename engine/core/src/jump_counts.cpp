#include "liveprob/core/jump_counts.hpp"

#include <algorithm>
#include <cmath>

namespace liveprob::core {
namespace {

// Below this a weight is carried as its logarithm (exp would lose it to underflow).
constexpr double kLinearFloor = 1e-280;

}  // namespace

JumpCounts JumpCounts::after(int earlier, double later_scale) const noexcept {
    if (is_poisson()) return poisson(later_scale);
    return negative_binomial(shape + earlier, later_scale / (1.0 + scale));
}

std::size_t jump_weights(const JumpCounts& counts, double factor, std::span<double> out) noexcept {
    if (out.empty()) return 0;
    const bool poisson = counts.is_poisson();
    const double c = std::max(counts.scale, 0.0);
    // Ratio P(n+1)/P(n): Poisson c/(n+1); negative binomial (shape+n)/(n+1) · q.
    const double q = poisson ? 0.0 : c / (1.0 + c);
    auto ratio = [&](double n) {
        return poisson ? c / (n + 1.0) : (counts.shape + n) / (n + 1.0) * q;
    };
    double log_w = poisson ? -c : -counts.shape * std::log1p(c);
    double w = std::exp(log_w);
    double written = 0.0;
    std::size_t n = 0;
    for (;; ++n) {
        out[n] = factor * w;
        written += w;
        const double r_now = ratio(static_cast<double>(n));
        // Every later ratio is at most r_bound: Poisson ratios fall; negative-binomial ratios
        // fall towards q when shape > 1 and rise towards it when shape < 1.
        const double r_next = ratio(static_cast<double>(n) + 1.0);
        const double r_bound = poisson ? r_next : std::max(r_next, q);
        const double next = w * r_now;
        if (r_bound < 1.0 && factor * next / (1.0 - r_bound) <= kJumpTailTolerance) break;
        if (n + 1 == out.size()) {
            out[n] += factor * std::max(0.0, 1.0 - written);
            break;
        }
        if (w < kLinearFloor) {
            log_w += std::log(r_now);
            w = std::exp(log_w);
        } else {
            w = next;
        }
    }
    return n + 1;
}

}  // namespace liveprob::core
