#include "liveprob/fit/margin.hpp"

#include <cmath>
#include <numeric>
#include <stdexcept>

namespace liveprob::fit {
namespace {

std::vector<double> shin_fair(std::span<const double> quoted, double booksum, double z) {
    std::vector<double> p(quoted.size());
    for (std::size_t i = 0; i < quoted.size(); ++i)
        p[i] = (std::sqrt(z * z + 4.0 * (1.0 - z) * quoted[i] * quoted[i] / booksum) - z) /
               (2.0 * (1.0 - z));
    return p;
}

double total(const std::vector<double>& v) { return std::accumulate(v.begin(), v.end(), 0.0); }

}  // namespace

FairProbabilities remove_margin(std::span<const double> prices, MarginMethod method) {
    if (prices.size() < 2) throw std::invalid_argument("need at least two prices");
    std::vector<double> quoted;
    quoted.reserve(prices.size());
    for (double o : prices) {
        if (!std::isfinite(o) || o <= 1.0)
            throw std::invalid_argument("a decimal price must be a finite number above 1");
        quoted.push_back(1.0 / o);
    }
    const double booksum = total(quoted);
    FairProbabilities out;
    out.overround = booksum - 1.0;
    if (method == MarginMethod::proportional) {
        for (double q : quoted) out.p.push_back(q / booksum);
        return out;
    }
    if (booksum < 1.0 - 1e-9)
        throw std::invalid_argument(
            "the prices sum to less than 1 (sum of 1/price below 1): Shin needs a margin");
    if (booksum <= 1.0) {  // a fair book (up to rounding): no insiders
        for (double q : quoted) out.p.push_back(q / booksum);
        return out;
    }
    // Σ p_i(z) falls from booksum (z = 0) as z grows; find where it crosses 1.
    double lo = 0.0, hi = 1.0 - 1e-12;
    if (total(shin_fair(quoted, booksum, hi)) > 1.0)
        throw std::invalid_argument("Shin: no insider share fits these prices");
    for (int i = 0; i < 200 && hi - lo > 1e-17; ++i) {
        const double mid = 0.5 * (lo + hi);
        (total(shin_fair(quoted, booksum, mid)) > 1.0 ? lo : hi) = mid;
    }
    out.insider_share = 0.5 * (lo + hi);
    out.p = shin_fair(quoted, booksum, out.insider_share);
    const double s = total(out.p);
    for (double& p : out.p) p /= s;  // removes the last rounding of the bisection
    return out;
}

std::vector<double> shin_quoted_probabilities(std::span<const double> fair, double z) {
    std::vector<double> root(fair.size());
    for (std::size_t i = 0; i < fair.size(); ++i)
        root[i] = std::sqrt(z * fair[i] + (1.0 - z) * fair[i] * fair[i]);
    const double s = total(root);
    for (double& r : root) r *= s;
    return root;
}

}  // namespace liveprob::fit
