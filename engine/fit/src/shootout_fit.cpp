#include "liveprob/fit/shootout_fit.hpp"

#include <algorithm>
#include <cmath>
#include <stdexcept>
#include <vector>

#include "liveprob/core/shootout.hpp"
#include "small_newton.hpp"

namespace liveprob::fit {
namespace {

// Sudden-death rounds in which both sides miss leave the tally unchanged, so a tally is reached
// along ever longer paths. Beyond the rounds the tally needs, this many more carry a probability
// below 1e-40 (for conversions above 0.05 and tallies below 60).
constexpr int kSpareRounds = 80;

double logistic(double x) { return 1.0 / (1.0 + std::exp(-x)); }
double logit(double p) { return std::log(p / (1.0 - p)); }

// P(first kicker wins) before the first kick.
double first_kicker_wins(double conversion, double edge) {
    core::ShootoutState state;
    state.first = core::Side::home;
    return shootout_home_win(core::ShootoutParams{conversion, edge}, state);
}

// Free parameters: logit of the second kicker's conversion, logit of the first kicker's. A
// parameter not fitted keeps its starting value: the conversion, or the edge over it.
struct Layout {
    bool conversion = false, edge = false;
    core::ShootoutParams start;
    Eigen::Index size() const { return (conversion ? 1 : 0) + (edge ? 1 : 0); }
    core::ShootoutParams params(const Eigen::VectorXd& x) const {
        const double p = conversion ? logistic(x[0]) : start.conversion;
        if (!edge) return {p, start.first_kicker_edge};
        return {p, logistic(x[conversion ? 1 : 0]) - p};
    }
};

double record_log_likelihood(const ShootoutRecord& r, const core::ShootoutParams& p) {
    const double first = p.conversion + p.first_kicker_edge, second = p.conversion;
    if (r.scored) {
        const auto& s = *r.scored;
        auto given_order = [&](core::Side first_side) {
            const auto f = static_cast<std::size_t>(index(first_side));
            return shootout_tally_probability(first, second, s[f], s[1 - f]);
        };
        const double prob =
            r.first_kicker ? given_order(*r.first_kicker)
                           : 0.5 * (given_order(core::Side::home) + given_order(core::Side::away));
        return std::log(prob);
    }
    if (r.first_kicker) {
        const double q = first_kicker_wins(second, first - second);
        return std::log(r.winner == *r.first_kicker ? q : 1.0 - q);
    }
    return std::log(0.5);
}

double log_likelihood(std::span<const ShootoutRecord> records, const core::ShootoutParams& p) {
    double ll = 0.0;
    for (const ShootoutRecord& r : records) ll += record_log_likelihood(r, p);
    return ll;
}

}  // namespace

double shootout_tally_probability(double first_conversion, double second_conversion,
                                  int first_scored, int second_scored) {
    if (first_scored < 0 || second_scored < 0) return 0.0;
    // Forward over kicks: the probability of each undecided (first scored, second scored) after
    // each kick, on a grid bounded by the tally (paths that overshoot it cannot end on it); the
    // kicks taken follow from the kick's number in ABAB order.
    const auto cols = static_cast<std::size_t>(second_scored) + 1;
    const std::size_t cells = (static_cast<std::size_t>(first_scored) + 1) * cols;
    std::vector<double> live(cells, 0.0), next(cells, 0.0);
    live[0] = 1.0;
    double reached = 0.0;
    const int rounds =
        std::max(first_scored, second_scored) + core::kShootoutRegularKicks + kSpareRounds;
    for (int kick = 0; kick < 2 * rounds; ++kick) {
        const bool first_kicks = kick % 2 == 0;
        const int ft = (kick + 2) / 2, st = (kick + 1) / 2;  // kicks taken once this one is in
        const double p = first_kicks ? first_conversion : second_conversion;
        std::fill(next.begin(), next.end(), 0.0);
        for (int fs = 0; fs <= first_scored; ++fs)
            for (int ss = 0; ss <= second_scored; ++ss) {
                const double prob =
                    live[static_cast<std::size_t>(fs) * cols + static_cast<std::size_t>(ss)];
                if (prob == 0.0) continue;
                for (const bool scored : {true, false}) {
                    const int nf = fs + (first_kicks && scored ? 1 : 0),
                              ns = ss + (!first_kicks && scored ? 1 : 0);
                    if (nf > first_scored || ns > second_scored) continue;
                    const double q = prob * (scored ? p : 1.0 - p);
                    if (core::shootout_outcome(ft, nf, st, ns) == core::ShootoutOutcome::undecided)
                        next[static_cast<std::size_t>(nf) * cols + static_cast<std::size_t>(ns)] +=
                            q;
                    else if (nf == first_scored && ns == second_scored) reached += q;
                }
            }
        live.swap(next);
    }
    return reached;
}

ShootoutFit fit_shootout(std::span<const ShootoutRecord> records,
                         const core::ShootoutParams& start) {
    const double start_first = start.conversion + start.first_kicker_edge;
    if (!(start.conversion > 0.0 && start.conversion < 1.0 && start_first > 0.0 &&
          start_first < 1.0))
        throw std::invalid_argument("shoot-out fit: starting conversions must lie in (0, 1)");
    ShootoutFit out;
    out.records = static_cast<int>(records.size());
    Layout layout;
    layout.start = start;
    for (const ShootoutRecord& r : records) {
        if (r.scored) {
            const auto& s = *r.scored;
            if (s[0] == s[1] || s[0] < 0 || s[1] < 0)
                throw std::invalid_argument("shoot-out fit: a tally must have a winner");
            if ((s[0] > s[1] ? core::Side::home : core::Side::away) != r.winner)
                throw std::invalid_argument(
                    "shoot-out fit: the tally's winner is not the record's winner");
            ++out.with_tally;
            out.tally_kicks_scored += s[0] + s[1];
            layout.conversion = true;
        }
        if (r.first_kicker) {
            ++out.with_first_kicker;
            out.first_kicker_wins += r.winner == *r.first_kicker ? 1 : 0;
            layout.edge = true;
        }
        if (!r.scored && !r.first_kicker) ++out.uninformative;
        if (r.scored && !std::isfinite(record_log_likelihood(r, start)))
            throw std::invalid_argument("shoot-out fit: a tally no kick sequence ends on");
    }
    out.conversion_fitted = layout.conversion;
    out.edge_fitted = layout.edge;
    out.params = start;
    if (layout.size() > 0) {
        detail::SmallProblem problem;
        problem.value = [&](const Eigen::VectorXd& x) {
            return log_likelihood(records, layout.params(x));
        };
        // The tally probabilities are sums over kick paths: differences of the log-likelihood
        // are accurate to about 1e-10 here, which is ample for a two-parameter Newton.
        problem.gradient = [&](const Eigen::VectorXd& x) {
            Eigen::VectorXd g(x.size());
            for (Eigen::Index i = 0; i < x.size(); ++i) {
                const double h = 1e-5;
                Eigen::VectorXd up = x, down = x;
                up[i] += h;
                down[i] -= h;
                g[i] = (problem.value(up) - problem.value(down)) / (2.0 * h);
            }
            return g;
        };
        problem.tolerance = 1e-9;
        Eigen::VectorXd x0(layout.size());
        if (layout.conversion) x0[0] = logit(start.conversion);
        if (layout.edge) x0[layout.conversion ? 1 : 0] = logit(start_first);
        const detail::SmallFit fit = detail::maximise(problem, x0);
        out.params = layout.params(fit.x);
        out.log_likelihood = fit.log_likelihood;
        out.iterations = fit.iterations;
        out.converged = fit.converged;
        // Delta method from the logits: d p / d x0 = p(1 − p); e = p_first − p.
        const double p = out.params.conversion, pf = p + out.params.first_kicker_edge;
        Eigen::VectorXd d_conversion = Eigen::VectorXd::Zero(layout.size()), d_edge = d_conversion,
                        d_q = d_conversion;
        if (layout.conversion) {
            d_conversion[0] = p * (1.0 - p);
            d_edge[0] = -p * (1.0 - p);
        }
        if (layout.edge) d_edge[layout.conversion ? 1 : 0] = pf * (1.0 - pf);
        // q as a function of the free parameters, by differences.
        for (Eigen::Index i = 0; i < layout.size(); ++i) {
            Eigen::VectorXd up = fit.x, down = fit.x;
            up[i] += 1e-6;
            down[i] -= 1e-6;
            const core::ShootoutParams u = layout.params(up), d = layout.params(down);
            d_q[i] = (first_kicker_wins(u.conversion, u.first_kicker_edge) -
                      first_kicker_wins(d.conversion, d.first_kicker_edge)) /
                     2e-6;
        }
        auto se = [&](const Eigen::VectorXd& grad) {
            return std::sqrt(std::max(grad.dot(fit.covariance * grad), 0.0));
        };
        out.conversion_se = layout.conversion ? se(d_conversion) : 0.0;
        out.edge_se = layout.edge ? se(d_edge) : 0.0;
        out.first_kicker_win_probability_se = se(d_q);
    } else {
        out.log_likelihood = log_likelihood(records, start);
        out.converged = true;
    }
    out.first_kicker_win_probability =
        first_kicker_wins(out.params.conversion, out.params.first_kicker_edge);
    return out;
}

}  // namespace liveprob::fit
