#include "liveprob/scoring/calibration.hpp"

#include <algorithm>
#include <cmath>

namespace liveprob::scoring {

int reliability_bin_index(double probability) noexcept {
    const double scaled = std::floor(probability * kReliabilityBins);
    if (!(scaled > 0.0)) return 0;  // also catches NaN
    return std::min(kReliabilityBins - 1, static_cast<int>(scaled));
}

void CalibrationTable::add(const Forecast& f, Outcome observed) noexcept {
    for (int k = 0; k < kOutcomes; ++k) {
        const double p = f[static_cast<std::size_t>(k)];
        auto& bin = diagrams_[static_cast<std::size_t>(k)]
                             [static_cast<std::size_t>(reliability_bin_index(p))];
        ++bin.count;
        bin.forecast_sum += p;
        bin.observed_sum += static_cast<int>(observed) == k ? 1.0 : 0.0;
    }
    ++count_;
}

double CalibrationTable::expected_calibration_error(Outcome o) const noexcept {
    if (count_ == 0) return 0.0;
    double weighted_gap = 0.0;
    for (const auto& bin : diagram(o))
        weighted_gap += std::fabs(bin.forecast_sum - bin.observed_sum);
    return weighted_gap / static_cast<double>(count_);
}

double CalibrationTable::expected_calibration_error() const noexcept {
    double sum = 0.0;
    for (int k = 0; k < kOutcomes; ++k) sum += expected_calibration_error(static_cast<Outcome>(k));
    return sum / kOutcomes;
}

}  // namespace liveprob::scoring
