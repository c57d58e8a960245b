#include "liveprob/engine/quadrature.hpp"

#include <Eigen/Eigenvalues>

#include <cmath>
#include <stdexcept>

namespace liveprob {
namespace {

// Fixed maximum sizes keep Eigen's storage inside the objects: no heap allocation.
using Vector = Eigen::Matrix<double, Eigen::Dynamic, 1, 0, kMaxQuadratureNodes, 1>;
using Matrix = Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, 0, kMaxQuadratureNodes,
                             kMaxQuadratureNodes>;

}  // namespace

void gamma_quadrature(double shape, int count, GammaQuadrature& out) {
    if (!(shape > 0.0) || !std::isfinite(shape)) {
        throw std::invalid_argument("gamma quadrature: shape must be positive and finite");
    }
    if (count < 1 || count > kMaxQuadratureNodes) {
        throw std::invalid_argument("gamma quadrature: node count out of range");
    }
    // Monic generalized Laguerre polynomials (parameter a = shape - 1) satisfy
    // p_{k+1} = (x - (2k + a + 1)) p_k - k (k + a) p_{k-1}; the Jacobi matrix holds the
    // diagonal terms and the square roots of the products (Golub & Welsch 1969).
    const double a = shape - 1.0;
    Vector diag(count);
    Vector sub(count > 1 ? count - 1 : 1);
    for (int k = 0; k < count; ++k) diag(k) = 2.0 * k + a + 1.0;
    for (int k = 1; k < count; ++k) sub(k - 1) = std::sqrt(k * (k + a));
    Eigen::SelfAdjointEigenSolver<Matrix> solver;
    if (count == 1) {
        out.count = 1;
        out.node[0] = shape;
        out.weight[0] = 1.0;
        return;
    }
    Vector sub_used = sub.head(count - 1);
    solver.computeFromTridiagonal(diag, sub_used, Eigen::ComputeEigenvectors);
    if (solver.info() != Eigen::Success) throw std::runtime_error("gamma quadrature: eigen solver failed");
    out.count = count;
    double total = 0.0;
    for (int k = 0; k < count; ++k) {
        const double v = solver.eigenvectors()(0, k);
        out.node[static_cast<std::size_t>(k)] = solver.eigenvalues()(k);
        out.weight[static_cast<std::size_t>(k)] = v * v;
        total += v * v;
    }
    for (int k = 0; k < count; ++k) out.weight[static_cast<std::size_t>(k)] /= total;
}

}  // namespace liveprob
