#include "liveprob/fit/goal_timing.hpp"

#include <Eigen/Dense>

#include <cmath>
#include <stdexcept>

namespace liveprob::fit {
namespace {

// ∫ over minute bucket [m−1, m] of the linear rate from `start` (t = 0) to `end` (t = 45).
double bucket(double start, double end, int minute_in_half) {
    const double mid = minute_in_half - 0.5;
    return start + (end - start) * mid / 45.0;
}

core::TimingProfile with(const core::TimingProfile& base, const Eigen::Vector4d& logs) {
    core::TimingProfile p = base;
    p.first_half_end = 1.0;
    p.first_half_start = std::exp(logs[0]);
    p.second_half_start = std::exp(logs[1]);
    p.second_half_end = std::exp(logs[2]);
    p.stoppage_factor = std::exp(logs[3]);
    return p;
}

double log_likelihood(const MinuteCounts& n, const core::TimingProfile& p) {
    const MinuteCounts s = minute_shares(p);
    double ll = 0.0;
    for (std::size_t i = 0; i < n.size(); ++i)
        if (n[i] > 0) ll += n[i] * std::log(s[i]);
    return ll;
}

double second_half_share(const core::TimingProfile& p) {
    const MinuteCounts s = minute_shares(p);
    double second = 0.0;
    for (std::size_t i = 45; i < 90; ++i) second += s[i];
    return second;
}

}  // namespace

MinuteCounts minute_shares(const core::TimingProfile& p) {
    MinuteCounts s{};
    double total = 0.0;
    for (int m = 1; m <= 45; ++m) {
        s[static_cast<std::size_t>(m - 1)] = bucket(p.first_half_start, p.first_half_end, m);
        s[static_cast<std::size_t>(m + 44)] = bucket(p.second_half_start, p.second_half_end, m);
    }
    s[44] += p.expected_stoppage_first * p.stoppage_factor * p.first_half_end;
    s[89] += p.expected_stoppage_second * p.stoppage_factor * p.second_half_end;
    for (double v : s) total += v;
    for (double& v : s) v /= total;
    return s;
}

StoppageFit fit_stoppage_factor(int regulation_goals, int stoppage_goals,
                                const core::TimingProfile& shape) {
    if (!(stoppage_goals > 0 && stoppage_goals < regulation_goals))
        throw std::invalid_argument("stoppage fit: needs some stoppage-time goals and some others");
    double minutes = 0.0;
    for (int m = 1; m <= 45; ++m)
        minutes += bucket(shape.first_half_start, shape.first_half_end, m) +
                   bucket(shape.second_half_start, shape.second_half_end, m);
    const double stoppage = shape.expected_stoppage_first * shape.first_half_end +
                            shape.expected_stoppage_second * shape.second_half_end;
    const double n = regulation_goals, s = stoppage_goals, share = s / n;
    StoppageFit out;
    out.regulation_goals = regulation_goals;
    out.stoppage_goals = stoppage_goals;
    out.factor = s / (n - s) * minutes / stoppage;
    // d f / d share = A / (B (1 − share)²); var(share) = share (1 − share) / N.
    out.factor_se =
        minutes / (stoppage * (1.0 - share) * (1.0 - share)) * std::sqrt(share * (1.0 - share) / n);
    return out;
}

TimingFit fit_goal_timing(const MinuteCounts& counts, const core::TimingProfile& start) {
    TimingFit out;
    for (std::size_t i = 0; i < counts.size(); ++i) {
        out.goals += counts[i];
        if (i >= 45) out.data_second_half_share += counts[i];
    }
    if (!(out.goals > 0)) throw std::invalid_argument("no goal minutes to fit");
    out.data_second_half_share /= out.goals;
    Eigen::Vector4d x(std::log(start.first_half_start / start.first_half_end),
                      std::log(start.second_half_start / start.first_half_end),
                      std::log(start.second_half_end / start.first_half_end),
                      std::log(start.stoppage_factor));
    auto f = [&](const Eigen::Vector4d& v) { return log_likelihood(counts, with(start, v)); };
    // Newton with a central-difference gradient and Hessian (four parameters, smooth).
    auto derivatives = [&](const Eigen::Vector4d& v, Eigen::Vector4d& g, Eigen::Matrix4d& h) {
        const double e = 1e-4;
        for (int i = 0; i < 4; ++i) {
            Eigen::Vector4d up = v, down = v;
            up[i] += e;
            down[i] -= e;
            g[i] = (f(up) - f(down)) / (2 * e);
            for (int j = 0; j < 4; ++j) {
                Eigen::Vector4d pp = v, pm = v, mp = v, mm = v;
                pp[i] += e;
                pp[j] += e;
                pm[i] += e;
                pm[j] -= e;
                mp[i] -= e;
                mp[j] += e;
                mm[i] -= e;
                mm[j] -= e;
                h(i, j) = (f(pp) - f(pm) - f(mp) + f(mm)) / (4 * e * e);
            }
        }
    };
    Eigen::Vector4d g;
    Eigen::Matrix4d h;
    for (int it = 1; it <= 100; ++it) {
        out.iterations = it;
        derivatives(x, g, h);
        Eigen::Vector4d step = -h.ldlt().solve(g);
        double t = 1.0;
        while (f(x + t * step) < f(x) && t > 1e-8) t *= 0.5;
        x += t * step;
        if ((t * step).cwiseAbs().maxCoeff() < 1e-9) {
            out.converged = true;
            break;
        }
    }
    derivatives(x, g, h);
    const Eigen::Matrix4d cov = (-h).inverse();
    out.profile = with(start, x);
    out.log_likelihood = f(x);
    // Standard errors of the profile values (delta method from the log scale).
    out.first_half_start_se = out.profile.first_half_start * std::sqrt(cov(0, 0));
    out.second_half_start_se = out.profile.second_half_start * std::sqrt(cov(1, 1));
    out.second_half_end_se = out.profile.second_half_end * std::sqrt(cov(2, 2));
    out.stoppage_factor_se = out.profile.stoppage_factor * std::sqrt(cov(3, 3));
    out.second_half_share = second_half_share(out.profile);
    Eigen::Vector4d grad;
    for (int i = 0; i < 4; ++i) {
        Eigen::Vector4d up = x, down = x;
        up[i] += 1e-6;
        down[i] -= 1e-6;
        grad[i] =
            (second_half_share(with(start, up)) - second_half_share(with(start, down))) / 2e-6;
    }
    out.second_half_share_se = std::sqrt(grad.dot(cov * grad));
    return out;
}

}  // namespace liveprob::fit
