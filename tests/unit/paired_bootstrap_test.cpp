// The paired bootstrap and the perfectly calibrated forecaster's ECE (replay-demo/scoring).
#include <catch2/catch.hpp>

#include <cmath>
#include <random>
#include <vector>

#include "liveprob/scoring/calibration_null.hpp"
#include "liveprob/scoring/paired_bootstrap.hpp"

namespace scoring = liveprob::scoring;

TEST_CASE("paired bootstrap: a constant shift has a point interval, and the seed fixes the rest",
          "[scoring]") {
    std::mt19937_64 g(7);
    std::normal_distribution<double> noise(0.2, 0.05);
    std::vector<double> b(2000), a(2000);
    for (std::size_t i = 0; i < b.size(); ++i) {
        b[i] = noise(g);
        a[i] = b[i] - 0.01;
    }
    const auto d = scoring::paired_bootstrap(a, b, {});
    CHECK(d.n == 2000);
    CHECK(d.difference == Approx(-0.01).margin(1e-12));
    CHECK(d.difference_low == Approx(-0.01).margin(1e-12));
    CHECK(d.difference_high == Approx(-0.01).margin(1e-12));
    CHECK(d.separated());
    CHECK(d.relative == Approx(d.mean_a / d.mean_b - 1.0));
    CHECK(d.relative_low <= d.relative);
    CHECK(d.relative_high >= d.relative);

    // Independent noise in the difference: the interval is the same for the same seed, differs
    // for another, and its half-width is close to 1.96 standard errors of the mean difference
    // (the normal approximation the percentile interval converges to).
    std::normal_distribution<double> extra(0.0, 0.04);
    double sum = 0, sum2 = 0;
    for (std::size_t i = 0; i < b.size(); ++i) {
        a[i] = b[i] + extra(g);
        sum += a[i] - b[i];
        sum2 += (a[i] - b[i]) * (a[i] - b[i]);
    }
    const double n = static_cast<double>(a.size());
    const double se = std::sqrt((sum2 / n - (sum / n) * (sum / n)) / n);
    const scoring::BootstrapSettings settings{2000, 11, 0.95};
    const auto first = scoring::paired_bootstrap(a, b, settings);
    const auto again = scoring::paired_bootstrap(a, b, settings);
    CHECK(first.difference_low == again.difference_low);
    CHECK(first.difference_high == again.difference_high);
    const auto other = scoring::paired_bootstrap(a, b, {2000, 12, 0.95});
    CHECK(other.difference_low != first.difference_low);
    const double half_width = (first.difference_high - first.difference_low) / 2;
    CHECK(half_width == Approx(1.96 * se).epsilon(0.1));
    CHECK(first.difference_low < first.difference);
    CHECK(first.difference_high > first.difference);

    CHECK(scoring::paired_bootstrap({}, {}, {}).n == 0);
    const std::vector<double> one{1.0};
    CHECK_THROWS(scoring::paired_bootstrap(one, {}, {}));
}

TEST_CASE("a perfectly calibrated forecaster's ECE matches the half-normal mean", "[scoring]") {
    // Every forecast the same: each outcome's forecasts fall in one bin, so its ECE is
    // |observed rate - p|, whose mean for n draws is sqrt(2/pi) * sqrt(p(1-p)/n) to first order
    // (the mean of a half-normal distribution). Class-wise ECE: the mean of the three.
    const scoring::Forecast f{0.45, 0.3, 0.25};
    const std::vector<scoring::Forecast> forecasts(4000, f);
    const auto ece = scoring::calibrated_forecaster_ece(forecasts, 1000, 3);
    double expected = 0.0;
    for (const double p : f) expected += std::sqrt(2.0 / M_PI) * std::sqrt(p * (1 - p) / 4000.0);
    expected /= 3.0;
    CHECK(ece.draws == 1000);
    CHECK(ece.mean == Approx(expected).epsilon(0.05));
    CHECK(ece.p95 > ece.mean);
    // Same seed, same figures.
    const auto again = scoring::calibrated_forecaster_ece(forecasts, 1000, 3);
    CHECK(again.mean == ece.mean);
    CHECK(scoring::calibrated_forecaster_ece({}, 10, 1).draws == 0);
}
