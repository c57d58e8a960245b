// Gauss quadrature for the strength mixture: E[f(θ)] with θ ~ Gamma(shape, rate) is
// approximated by Σ w_k f(x_k / rate), x_k, w_k the generalized Gauss–Laguerre nodes and
// weights for the weight x^(shape-1) e^(-x) (Golub–Welsch: eigenvalues of the Jacobi matrix
// of the Laguerre recurrence). Exact for f a polynomial of degree < 2n.
#pragma once

#include <array>

namespace liveprob {

inline constexpr int kMaxQuadratureNodes = 16;

struct GammaQuadrature {
    int count = 0;
    std::array<double, kMaxQuadratureNodes> node{};    // x_k for Gamma(shape, 1)
    std::array<double, kMaxQuadratureNodes> weight{};  // sum to 1
};

// Nodes and weights for Gamma(shape, 1), `count` in [1, kMaxQuadratureNodes]. Allocates
// nothing. Throws std::invalid_argument for shape <= 0 or count out of range.
void gamma_quadrature(double shape, int count, GammaQuadrature& out);

}  // namespace liveprob
