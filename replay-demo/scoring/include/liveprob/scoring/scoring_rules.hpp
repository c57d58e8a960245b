// Proper scoring rules for a three-way forecast of an ordered outcome (home win < draw < away
// win, ordered by the home side's goal difference). Lower is better for all three.
#pragma once

#include <array>
#include <cstdint>

namespace liveprob::scoring {

enum class Outcome : std::uint8_t { home = 0, draw = 1, away = 2 };
inline constexpr int kOutcomes = 3;

const char* outcome_name(Outcome o) noexcept;
// The outcome of a final regulation score.
Outcome outcome_of(int home_goals, int away_goals) noexcept;

// Probabilities of home win, draw, away win, in that order.
using Forecast = std::array<double, kOutcomes>;

// Smallest probability log loss uses, so a confident miss costs a large but finite amount.
inline constexpr double kLogLossFloor = 1e-15;

// Brier (1950) in its original multi-category form: the sum over the three outcomes of the
// squared gap between forecast and what happened (0 best, 2 worst).
double brier_score(const Forecast& f, Outcome observed) noexcept;

// Negative natural logarithm of the probability given to what happened (floored).
double log_loss(const Forecast& f, Outcome observed) noexcept;

// Ranked probability score (Epstein 1969): the squared gaps between cumulative forecast and
// cumulative outcome, summed over the first r-1 categories and divided by r-1 (0 best, 1 worst).
double ranked_probability_score(const Forecast& f, Outcome observed) noexcept;

}  // namespace liveprob::scoring
