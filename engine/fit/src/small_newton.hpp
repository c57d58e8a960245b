// Newton's method for the in-play fits: a handful of parameters, an analytic gradient, the
// Hessian by central differences of that gradient (private to the engine).
#pragma once

#include <Eigen/Dense>

#include <functional>

namespace liveprob::fit::detail {

struct SmallFit {
    Eigen::VectorXd x;           // the maximiser
    Eigen::MatrixXd covariance;  // inverse of minus the Hessian at x (observed information)
    double log_likelihood = 0.0;
    int iterations = 0;
    bool converged = false;
};

struct SmallProblem {
    std::function<double(const Eigen::VectorXd&)> value;
    std::function<Eigen::VectorXd(const Eigen::VectorXd&)> gradient;
    // Largest step (per coordinate) Newton may take at once: keeps early steps of a log-scale
    // parameter from jumping far past the region where the model makes sense.
    double max_step = 2.0;
    int max_iterations = 100;
    double tolerance = 1e-10;  // largest coordinate of the final step
};

// Minus the Hessian by central differences of the gradient, symmetrised.
Eigen::MatrixXd observed_information(const SmallProblem& p, const Eigen::VectorXd& x);

// Maximises p.value from `start`; steps halve until the value does not fall.
SmallFit maximise(const SmallProblem& p, Eigen::VectorXd start);

}  // namespace liveprob::fit::detail
