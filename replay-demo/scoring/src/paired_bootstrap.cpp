#include "liveprob/scoring/paired_bootstrap.hpp"

#include <algorithm>
#include <cmath>
#include <random>
#include <stdexcept>
#include <vector>

namespace liveprob::scoring {

namespace {

// The q-quantile of sorted values, interpolated linearly between order statistics (the default
// of numpy.percentile and R's type 7).
double quantile(const std::vector<double>& sorted, double q) {
    if (sorted.empty()) return 0.0;
    const double at = q * static_cast<double>(sorted.size() - 1);
    const auto low = static_cast<std::size_t>(std::floor(at));
    const std::size_t high = std::min(low + 1, sorted.size() - 1);
    return sorted[low] + (at - static_cast<double>(low)) * (sorted[high] - sorted[low]);
}

}  // namespace

PairedDifference paired_bootstrap(std::span<const double> a, std::span<const double> b,
                                  const BootstrapSettings& settings) {
    if (a.size() != b.size())
        throw std::invalid_argument("paired bootstrap: the two score lists differ in length");
    PairedDifference out;
    out.n = a.size();
    if (a.empty()) return out;
    const auto n = a.size();
    double sum_a = 0.0, sum_b = 0.0;
    for (std::size_t i = 0; i < n; ++i) {
        sum_a += a[i];
        sum_b += b[i];
    }
    out.mean_a = sum_a / static_cast<double>(n);
    out.mean_b = sum_b / static_cast<double>(n);
    out.difference = out.mean_a - out.mean_b;
    out.relative = out.mean_b != 0.0 ? out.mean_a / out.mean_b - 1.0 : 0.0;

    std::mt19937_64 generator(settings.seed);
    std::vector<double> differences, relatives;
    differences.reserve(static_cast<std::size_t>(std::max(0, settings.resamples)));
    relatives.reserve(differences.capacity());
    for (int r = 0; r < settings.resamples; ++r) {
        double ra = 0.0, rb = 0.0;
        for (std::size_t k = 0; k < n; ++k) {
            // A uniform index by the multiply-shift of the top 32 bits (bias below 1e-9 for any
            // n the tool sees; the standard's distributions differ between libraries).
            const auto i = static_cast<std::size_t>(((generator() >> 32) * n) >> 32);
            ra += a[i];
            rb += b[i];
        }
        differences.push_back((ra - rb) / static_cast<double>(n));
        relatives.push_back(rb != 0.0 ? ra / rb - 1.0 : 0.0);
    }
    std::sort(differences.begin(), differences.end());
    std::sort(relatives.begin(), relatives.end());
    const double tail = (1.0 - settings.level) / 2.0;
    out.difference_low = quantile(differences, tail);
    out.difference_high = quantile(differences, 1.0 - tail);
    out.relative_low = quantile(relatives, tail);
    out.relative_high = quantile(relatives, 1.0 - tail);
    return out;
}

}  // namespace liveprob::scoring
