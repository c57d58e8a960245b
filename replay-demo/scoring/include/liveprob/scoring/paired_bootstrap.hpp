// Paired bootstrap of a difference in mean scores (Efron & Tibshirani 1993, the percentile
// interval): the same matches are resampled for both forecasters, so what the two have in common
// (a hard match is hard for both) cancels, and the interval is that of the difference itself.
// Resampling is driven by a seeded generator whose sequence the C++ standard fixes
// (std::mt19937_64), so the same seed gives the same interval on every platform.
#pragma once

#include <cstdint>
#include <span>

namespace liveprob::scoring {

struct BootstrapSettings {
    int resamples = 1000;
    std::uint64_t seed = 20261202;
    double level = 0.95;  // two-sided percentile interval
};

struct PairedDifference {
    std::uint64_t n = 0;
    double mean_a = 0.0, mean_b = 0.0;
    double difference = 0.0;  // mean_a - mean_b: negative when a scores lower (better)
    double difference_low = 0.0, difference_high = 0.0;
    // mean_a / mean_b - 1, the difference as a share of b's score, with its interval from the
    // same resamples.
    double relative = 0.0;
    double relative_low = 0.0, relative_high = 0.0;
    // Whether the interval of the difference excludes 0 (the two can be told apart at this n).
    bool separated() const noexcept { return difference_high < 0.0 || difference_low > 0.0; }
};

// `a[i]` and `b[i]`: the two forecasters' scores of match i (equal lengths). Empty input gives
// n = 0 and zeros.
PairedDifference paired_bootstrap(std::span<const double> a, std::span<const double> b,
                                  const BootstrapSettings& settings);

}  // namespace liveprob::scoring
