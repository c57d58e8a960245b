// Scores by minute of the match: every forecast made at a bucket's minute is scored against the
// match's regulation result, so calibration can be read as the clock runs.
#pragma once

#include <array>
#include <cstdint>
#include <string_view>

#include "liveprob/scoring/calibration.hpp"
#include "liveprob/scoring/scoring_rules.hpp"

namespace liveprob::scoring {

// Bucket minutes: kick-off, every quarter hour, 85, and the start of second-half stoppage
// (90:00 on the clock, shown as "90+").
inline constexpr std::array<int, 8> kBucketMinutes{0, 15, 30, 45, 60, 75, 85, 90};
inline constexpr int kBuckets = static_cast<int>(kBucketMinutes.size());
std::string_view bucket_label(int bucket) noexcept;

// Mean scores of a set of forecasts, with their calibration.
class ScoreAccumulator {
public:
    void add(const Forecast& f, Outcome observed) noexcept;

    std::uint64_t count() const noexcept { return calibration_.count(); }
    double mean_brier() const noexcept { return mean(brier_sum_); }
    double mean_log_loss() const noexcept { return mean(log_loss_sum_); }
    double mean_rps() const noexcept { return mean(rps_sum_); }
    const CalibrationTable& calibration() const noexcept { return calibration_; }

private:
    double mean(double sum) const noexcept {
        return count() ? sum / static_cast<double>(count()) : 0.0;
    }
    double brier_sum_ = 0.0;
    double log_loss_sum_ = 0.0;
    double rps_sum_ = 0.0;
    CalibrationTable calibration_;
};

using BucketScores = std::array<ScoreAccumulator, kBuckets>;

}  // namespace liveprob::scoring
