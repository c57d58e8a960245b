// Reliability diagrams and expected calibration error for three-way forecasts.
#pragma once

#include <array>
#include <cstdint>

#include "liveprob/scoring/scoring_rules.hpp"

namespace liveprob::scoring {

inline constexpr int kReliabilityBins = 10;

// One bin of a reliability diagram: forecasts of one outcome that fell in
// [index/10, (index+1)/10) (the last bin also takes 1.0), and how often that outcome happened.
struct ReliabilityBin {
    std::uint64_t count = 0;
    double forecast_sum = 0.0;  // sum of the forecast probabilities in the bin
    double observed_sum = 0.0;  // number of times the outcome happened

    double mean_forecast() const noexcept {
        return count ? forecast_sum / static_cast<double>(count) : 0.0;
    }
    double observed_rate() const noexcept {
        return count ? observed_sum / static_cast<double>(count) : 0.0;
    }
};

using ReliabilityDiagram = std::array<ReliabilityBin, kReliabilityBins>;

int reliability_bin_index(double probability) noexcept;

// Reliability diagrams for the three outcomes, filled one forecast at a time.
class CalibrationTable {
public:
    void add(const Forecast& f, Outcome observed) noexcept;

    const ReliabilityDiagram& diagram(Outcome o) const noexcept {
        return diagrams_[static_cast<std::size_t>(o)];
    }
    std::uint64_t count() const noexcept { return count_; }

    // Expected calibration error of one outcome: the count-weighted mean, over the bins, of
    // |mean forecast - observed rate| (the binned estimate of Naeini et al. 2015).
    double expected_calibration_error(Outcome o) const noexcept;
    // The mean of the three outcomes' errors (the "class-wise" form of Kull et al. 2019).
    double expected_calibration_error() const noexcept;

private:
    std::array<ReliabilityDiagram, kOutcomes> diagrams_{};
    std::uint64_t count_ = 0;
};

}  // namespace liveprob::scoring
