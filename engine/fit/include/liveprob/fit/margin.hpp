// Removing the bookmaker's margin from decimal prices: fair probabilities that sum to 1.
#pragma once

#include <span>
#include <vector>

namespace liveprob::fit {

enum class MarginMethod { proportional, shin };

struct FairProbabilities {
    std::vector<double> p;       // same order as the prices
    double overround = 0.0;      // Σ 1/price − 1
    double insider_share = 0.0;  // Shin's z (0 for the proportional method)
};

// Proportional: p_i = (1/o_i) / Σ_j 1/o_j  (common practice).
// Shin (1993): quoted probabilities π_i = 1/o_i arise from fair p_i when a share z of the money
// comes from insiders; the inverse, solved here for z by bisection so that Σ p_i = 1, is
//   p_i = (sqrt(z² + 4 (1 − z) π_i² / Σπ) − z) / (2 (1 − z))
// (the closed form as commonly stated after Jullien & Salanié 1994; from memory).
// Throws std::invalid_argument for fewer than two prices, a price <= 1 or not finite, or a
// book without margin (Σ 1/o_i < 1) for Shin.
[[nodiscard]] FairProbabilities remove_margin(std::span<const double> decimal_prices,
                                              MarginMethod method);

// The forward Shin model: the quoted probabilities (summing to more than 1) that fair p and
// insider share z produce: π_i = sqrt(z p_i + (1 − z) p_i²) · Σ_j sqrt(z p_j + (1 − z) p_j²)
// (from memory, same sources). Used to build priced books in tests and the demo.
[[nodiscard]] std::vector<double> shin_quoted_probabilities(std::span<const double> fair, double z);

}  // namespace liveprob::fit
