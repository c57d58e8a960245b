#include "small_newton.hpp"

#include <cmath>

namespace liveprob::fit::detail {

Eigen::MatrixXd observed_information(const SmallProblem& p, const Eigen::VectorXd& x) {
    const Eigen::Index n = x.size();
    Eigen::MatrixXd h(n, n);
    for (Eigen::Index i = 0; i < n; ++i) {
        const double e = 1e-5 * std::max(1.0, std::abs(x[i]));
        Eigen::VectorXd up = x, down = x;
        up[i] += e;
        down[i] -= e;
        h.col(i) = -(p.gradient(up) - p.gradient(down)) / (2.0 * e);
    }
    return 0.5 * (h + h.transpose());
}

SmallFit maximise(const SmallProblem& p, Eigen::VectorXd start) {
    SmallFit out;
    Eigen::VectorXd x = std::move(start);
    double value = p.value(x);
    for (out.iterations = 1; out.iterations <= p.max_iterations; ++out.iterations) {
        const Eigen::VectorXd g = p.gradient(x);
        const Eigen::MatrixXd info = observed_information(p, x);
        Eigen::VectorXd step = info.ldlt().solve(g);
        // Not an ascent direction (information not positive definite far from the peak):
        // a gradient step instead.
        if (!step.allFinite() || step.dot(g) <= 0.0)
            step = g / std::max(info.diagonal().cwiseAbs().maxCoeff(), 1.0);
        const double largest = step.cwiseAbs().maxCoeff();
        if (largest > p.max_step) step *= p.max_step / largest;
        double f = 1.0;
        Eigen::VectorXd next = x + step;
        double next_value = p.value(next);
        while (!(next_value >= value - 1e-12 * std::abs(value)) && f > 1e-8) {
            f *= 0.5;
            next = x + f * step;
            next_value = p.value(next);
        }
        if (!(next_value >= value - 1e-12 * std::abs(value))) break;  // no progress possible
        x = next;
        value = next_value;
        if ((f * step).cwiseAbs().maxCoeff() < p.tolerance) {
            out.converged = true;
            break;
        }
    }
    out.x = x;
    out.log_likelihood = value;
    const Eigen::MatrixXd info = observed_information(p, x);
    out.covariance = info.inverse();
    return out;
}

}  // namespace liveprob::fit::detail
