#include "liveprob/scoring/scoring_rules.hpp"

#include <algorithm>
#include <cmath>

namespace liveprob::scoring {

const char* outcome_name(Outcome o) noexcept {
    switch (o) {
        case Outcome::home: return "home";
        case Outcome::draw: return "draw";
        case Outcome::away: return "away";
    }
    return "unknown";
}

Outcome outcome_of(int home_goals, int away_goals) noexcept {
    if (home_goals > away_goals) return Outcome::home;
    if (home_goals < away_goals) return Outcome::away;
    return Outcome::draw;
}

namespace {
double indicator(Outcome observed, int k) noexcept {
    return static_cast<int>(observed) == k ? 1.0 : 0.0;
}
}  // namespace

double brier_score(const Forecast& f, Outcome observed) noexcept {
    double sum = 0.0;
    for (int k = 0; k < kOutcomes; ++k) {
        const double gap = f[static_cast<std::size_t>(k)] - indicator(observed, k);
        sum += gap * gap;
    }
    return sum;
}

double log_loss(const Forecast& f, Outcome observed) noexcept {
    const double p = f[static_cast<std::size_t>(observed)];
    return -std::log(std::max(p, kLogLossFloor));
}

double ranked_probability_score(const Forecast& f, Outcome observed) noexcept {
    double cumulative_forecast = 0.0;
    double cumulative_outcome = 0.0;
    double sum = 0.0;
    for (int k = 0; k < kOutcomes - 1; ++k) {
        cumulative_forecast += f[static_cast<std::size_t>(k)];
        cumulative_outcome += indicator(observed, k);
        const double gap = cumulative_forecast - cumulative_outcome;
        sum += gap * gap;
    }
    return sum / (kOutcomes - 1);
}

}  // namespace liveprob::scoring
