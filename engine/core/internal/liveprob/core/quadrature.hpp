// Gauss quadrature for the strength mixture (Golub–Welsch: nodes are the eigenvalues of the
// Jacobi matrix of the orthogonal polynomials' recurrence, weights the squared first
// components of its eigenvectors). An n-node rule is exact for polynomials of degree < 2n.
//  - Gamma: E[f(θ)] with θ ~ Gamma(shape, rate) ≈ Σ w_k f(x_k / rate), x_k, w_k the
//    generalized Gauss–Laguerre rule for the weight x^(shape-1) e^(-x).
//  - Beta: E[f(ρ)] with ρ ~ Beta(a, b) ≈ Σ w_k f(ρ_k), the Gauss–Jacobi rule mapped to [0, 1].
#pragma once

#include <array>

namespace liveprob::core {

inline constexpr int kMaxQuadratureNodes = 16;

struct QuadratureRule {
    int count = 0;
    std::array<double, kMaxQuadratureNodes> node{};    // x_k (Gamma(shape, 1)) or ρ_k (Beta)
    std::array<double, kMaxQuadratureNodes> weight{};  // sum to 1
};
using GammaQuadrature = QuadratureRule;

// Nodes and weights for Gamma(shape, 1), `count` in [1, kMaxQuadratureNodes]. Allocates
// nothing. Throws std::invalid_argument for shape <= 0 or count out of range.
void gamma_quadrature(double shape, int count, QuadratureRule& out);

// Nodes in (0, 1) and weights for Beta(a, b), `count` in [1, kMaxQuadratureNodes]. Allocates
// nothing. Throws std::invalid_argument for a or b not positive and finite, or count out of
// range.
void beta_quadrature(double a, double b, int count, QuadratureRule& out);

}  // namespace liveprob::core
