#include "liveprob/core/quadrature.hpp"

#include <Eigen/Eigenvalues>

#include <cmath>
#include <stdexcept>

namespace liveprob::core {
namespace {

// Fixed maximum sizes keep Eigen's storage inside the objects: no heap allocation.
using Vector = Eigen::Matrix<double, Eigen::Dynamic, 1, 0, kMaxQuadratureNodes, 1>;
using Matrix = Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, 0, kMaxQuadratureNodes,
                             kMaxQuadratureNodes>;

// Eigen-decomposes the symmetric tridiagonal Jacobi matrix (diagonal `diag`, off-diagonal
// `sub`) of `count` nodes into the rule: nodes mapped by node_of, weights normalised.
template <class NodeMap>
void golub_welsch(const Vector& diag, const Vector& sub, int count, NodeMap node_of,
                  QuadratureRule& out) {
    Eigen::SelfAdjointEigenSolver<Matrix> solver;
    Vector sub_used = sub.head(count - 1);
    solver.computeFromTridiagonal(diag, sub_used, Eigen::ComputeEigenvectors);
    if (solver.info() != Eigen::Success)
        throw std::runtime_error("quadrature: eigen solver failed");
    out.count = count;
    double total = 0.0;
    for (int k = 0; k < count; ++k) {
        const double v = solver.eigenvectors()(0, k);
        out.node[static_cast<std::size_t>(k)] = node_of(solver.eigenvalues()(k));
        out.weight[static_cast<std::size_t>(k)] = v * v;
        total += v * v;
    }
    for (int k = 0; k < count; ++k) out.weight[static_cast<std::size_t>(k)] /= total;
}

void check_count(int count) {
    if (count < 1 || count > kMaxQuadratureNodes) {
        throw std::invalid_argument("quadrature: node count out of range");
    }
}

}  // namespace

void gamma_quadrature(double shape, int count, QuadratureRule& out) {
    if (!(shape > 0.0) || !std::isfinite(shape)) {
        throw std::invalid_argument("gamma quadrature: shape must be positive and finite");
    }
    check_count(count);
    if (count == 1) {
        out.count = 1;
        out.node[0] = shape;
        out.weight[0] = 1.0;
        return;
    }
    // Monic generalized Laguerre polynomials (parameter a = shape - 1) satisfy
    // p_{k+1} = (x - (2k + a + 1)) p_k - k (k + a) p_{k-1}.
    const double a = shape - 1.0;
    Vector diag(count);
    Vector sub(count - 1);
    for (int k = 0; k < count; ++k) diag(k) = 2.0 * k + a + 1.0;
    for (int k = 1; k < count; ++k) sub(k - 1) = std::sqrt(k * (k + a));
    golub_welsch(
        diag, sub, count, [](double x) { return x; }, out);
}

void beta_quadrature(double a, double b, int count, QuadratureRule& out) {
    if (!(a > 0.0) || !std::isfinite(a) || !(b > 0.0) || !std::isfinite(b)) {
        throw std::invalid_argument("beta quadrature: both shapes must be positive and finite");
    }
    check_count(count);
    if (count == 1) {
        out.count = 1;
        out.node[0] = a / (a + b);
        out.weight[0] = 1.0;
        return;
    }
    // Jacobi polynomials on [-1, 1] for the weight (1 - x)^al (1 + x)^be, al = b - 1,
    // be = a - 1, so that rho = (1 + x) / 2 has the Beta(a, b) density. Monic recurrence
    // coefficients (Golub & Welsch 1969, table of classical weights):
    //   diagonal  (be^2 - al^2) / ((2k + s)(2k + s + 2)),           s = al + be
    //   squared off-diagonal  4k(k + al)(k + be)(k + s) / ((2k + s)^2 (2k + s + 1)(2k + s - 1)),
    // with the k = 1 term's factor (1 + s) cancelled so that s = -1 needs no special case.
    const double al = b - 1.0;
    const double be = a - 1.0;
    const double s = al + be;
    Vector diag(count);
    Vector sub(count - 1);
    diag(0) = (be - al) / (s + 2.0);
    for (int k = 1; k < count; ++k) {
        const double t = 2.0 * k + s;
        diag(k) = (be * be - al * al) / (t * (t + 2.0));
    }
    sub(0) = std::sqrt(4.0 * (1.0 + al) * (1.0 + be) / ((2.0 + s) * (2.0 + s) * (3.0 + s)));
    for (int k = 2; k < count; ++k) {
        const double t = 2.0 * k + s;
        sub(k - 1) =
            std::sqrt(4.0 * k * (k + al) * (k + be) * (k + s) / (t * t * (t + 1.0) * (t - 1.0)));
    }
    golub_welsch(
        diag, sub, count, [](double x) { return 0.5 * (1.0 + x); }, out);
}

}  // namespace liveprob::core
