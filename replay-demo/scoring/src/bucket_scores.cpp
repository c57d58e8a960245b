#include "liveprob/scoring/bucket_scores.hpp"

namespace liveprob::scoring {

std::string_view bucket_label(int bucket) noexcept {
    static constexpr std::array<std::string_view, kBuckets> labels{"0",  "15", "30", "45",
                                                                   "60", "75", "85", "90+"};
    if (bucket < 0 || bucket >= kBuckets) return "?";
    return labels[static_cast<std::size_t>(bucket)];
}

void ScoreAccumulator::add(const Forecast& f, Outcome observed) noexcept {
    brier_sum_ += brier_score(f, observed);
    log_loss_sum_ += log_loss(f, observed);
    rps_sum_ += ranked_probability_score(f, observed);
    calibration_.add(f, observed);
}

}  // namespace liveprob::scoring
