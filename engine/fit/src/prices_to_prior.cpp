#include "liveprob/fit/prices_to_prior.hpp"

#include <Eigen/Dense>

#include <array>
#include <cmath>
#include <stdexcept>
#include <vector>

namespace liveprob::fit {
namespace {

// P(X = k) for k = 0.. until the upper tail left out is below 1e-17. The tail is bounded past
// the mode by a geometric series, P(X > k) <= p_k r / (1 - r) with r = lambda / (k + 2): a test
// on 1 - (the sum so far) could never pass (the sum's rounding error is 1e-16), and ran every
// call to k = 100,000.
std::vector<double> poisson_pmf(double lambda) {
    std::vector<double> pmf;
    double p = std::exp(-lambda);
    for (int k = 0; k < 100000; ++k) {
        pmf.push_back(p);
        const double r = lambda / (k + 2);
        if (k > lambda && p * r / (1.0 - r) < 1e-17) break;
        p *= lambda / (k + 1);
    }
    return pmf;
}

}  // namespace

PreMatchProbabilities independent_poisson(double lh, double la, std::optional<double> total_line) {
    if (!(lh > 0.0) || !(la > 0.0) || !std::isfinite(lh) || !std::isfinite(la))
        throw std::invalid_argument("expected goals must be positive and finite");
    const auto ph = poisson_pmf(lh), pa = poisson_pmf(la);
    PreMatchProbabilities out;
    // Cumulative of the away side, so each home score i adds P(H=i)·P(A<i), P(H=i)·P(A=i).
    double below = 0.0;
    for (std::size_t i = 0; i < ph.size(); ++i) {
        const double same = i < pa.size() ? pa[i] : 0.0;
        out.home += ph[i] * below;
        out.draw += ph[i] * same;
        below += same;
    }
    out.away = 1.0 - out.home - out.draw;
    if (total_line) {
        // Total goals ~ Poisson(λ_H + λ_A).
        const auto total = poisson_pmf(lh + la);
        double at_most = 0.0;
        for (std::size_t k = 0; k < total.size() && static_cast<double>(k) <= *total_line; ++k)
            at_most += total[k];
        out.over = 1.0 - at_most;
    }
    return out;
}

PreMatchModel independent_poisson_model() { return independent_poisson; }

PriorFromPrices prior_from_prices(const PriceBook& book, MarginMethod method,
                                  const PreMatchModel& model) {
    PriorFromPrices out;
    const std::array<double, 3> prices{book.home, book.draw, book.away};
    const FairProbabilities fair = remove_margin(prices, method);
    out.fair_home = fair.p[0];
    out.fair_draw = fair.p[1];
    out.fair_away = fair.p[2];
    out.overround_1x2 = fair.overround;
    out.insider_share = fair.insider_share;
    std::optional<double> line;
    std::vector<double> target{out.fair_home, out.fair_away};
    if (book.total) {
        if (std::floor(book.total->line) == book.total->line)
            throw std::invalid_argument("the total-goals line must be a half line (e.g. 2.5)");
        const std::array<double, 2> ou{book.total->over, book.total->under};
        out.fair_over = remove_margin(ou, method).p[0];
        line = book.total->line;
        target.push_back(*out.fair_over);
    }
    auto residuals = [&](const Eigen::Vector2d& x) {
        const PreMatchProbabilities p = model(std::exp(x[0]), std::exp(x[1]), line);
        Eigen::VectorXd r(static_cast<Eigen::Index>(target.size()));
        r[0] = p.home - target[0];
        r[1] = p.away - target[1];
        if (line) r[2] = p.over - target[2];
        return r;
    };
    // Start from equal sides with 2.6 goals, nudged toward the favourite.
    Eigen::Vector2d x(std::log(1.3) + 0.5 * (out.fair_home - out.fair_away),
                      std::log(1.3) - 0.5 * (out.fair_home - out.fair_away));
    Eigen::VectorXd r = residuals(x);
    for (int it = 1; it <= 100; ++it) {
        out.iterations = it;
        // Central-difference Jacobian: the model is a black box.
        Eigen::MatrixXd jac(r.size(), 2);
        for (int j = 0; j < 2; ++j) {
            Eigen::Vector2d up = x, down = x;
            up[j] += 1e-6;
            down[j] -= 1e-6;
            jac.col(j) = (residuals(up) - residuals(down)) / 2e-6;
        }
        const Eigen::Vector2d step = -jac.colPivHouseholderQr().solve(r);
        double f = 1.0;
        Eigen::Vector2d next = x + step;
        Eigen::VectorXd next_r = residuals(next);
        while (next_r.squaredNorm() > r.squaredNorm() && f > 1e-8) {
            f *= 0.5;
            next = x + f * step;
            next_r = residuals(next);
        }
        x = next;
        r = next_r;
        if ((f * step).cwiseAbs().maxCoeff() < 1e-14) break;
    }
    out.lambda_home = std::exp(x[0]);
    out.lambda_away = std::exp(x[1]);
    out.residual = r.cwiseAbs().maxCoeff();
    if (!line && out.residual > 1e-9)
        throw std::runtime_error("the pre-match model cannot reproduce these fair probabilities");
    return out;
}

PriceBook fair_prices(double lh, double la, std::optional<double> total_line,
                      const PreMatchModel& model) {
    const PreMatchProbabilities p = model(lh, la, total_line);
    PriceBook book{1.0 / p.home, 1.0 / p.draw, 1.0 / p.away, std::nullopt};
    if (total_line)
        book.total = PriceBook::TotalLine{*total_line, 1.0 / p.over, 1.0 / (1.0 - p.over)};
    return book;
}

}  // namespace liveprob::fit
