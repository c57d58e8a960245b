// What expected calibration error a perfectly calibrated forecaster would show on the same
// forecasts: outcomes are drawn from the forecasts themselves (so each is calibrated by
// construction) and the ECE recomputed. The binned ECE is never 0 at a finite n; an observed
// ECE is judged against this spread, not against 0 or a fixed bar.
#pragma once

#include <cstdint>
#include <span>

#include "liveprob/scoring/scoring_rules.hpp"

namespace liveprob::scoring {

struct CalibratedEce {
    int draws = 0;
    double mean = 0.0;
    double p95 = 0.0;  // 95th percentile of the draws
};

// `draws` sets of outcomes, each drawn from the forecasts with a generator seeded by `seed`
// (std::mt19937_64, a sequence the C++ standard fixes).
CalibratedEce calibrated_forecaster_ece(std::span<const Forecast> forecasts, int draws,
                                        std::uint64_t seed);

}  // namespace liveprob::scoring
