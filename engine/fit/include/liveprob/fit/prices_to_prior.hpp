// From market prices to the pre-match prior: margin removed, then the expected regulation
// goals λ_H, λ_A solved so that the pre-match model reproduces the fair probabilities.
#pragma once

#include <functional>
#include <optional>

#include "liveprob/fit/margin.hpp"

namespace liveprob::fit {

struct PreMatchProbabilities {
    double home = 0.0, draw = 0.0, away = 0.0;
    double over = 0.0;  // P(total goals > line); 0 when no line was asked for
};

// The pre-match model the solver inverts: (λ_H, λ_A, total line or nullopt) → probabilities.
// The default is independent Poisson scores (W/D/L = the Skellam distribution); the full
// in-play model evaluated at kick-off can be plugged in instead.
using PreMatchModel = std::function<PreMatchProbabilities(double, double, std::optional<double>)>;

// Independent Poisson: exact sums over the score grid, truncated where the remaining mass of
// each side is below 1e-17.
[[nodiscard]] PreMatchProbabilities independent_poisson(double lambda_home, double lambda_away,
                                                        std::optional<double> total_line);
[[nodiscard]] PreMatchModel independent_poisson_model();

struct PriceBook {
    double home = 0.0, draw = 0.0, away = 0.0;  // decimal prices
    struct TotalLine {
        double line = 2.5;  // a half line: over means total goals > line
        double over = 0.0, under = 0.0;
    };
    std::optional<TotalLine> total;
};

struct PriorFromPrices {
    double lambda_home = 0.0, lambda_away = 0.0;
    double fair_home = 0.0, fair_draw = 0.0, fair_away = 0.0;
    std::optional<double> fair_over;
    double overround_1x2 = 0.0;
    double insider_share = 0.0;  // Shin's z on the 1X2 book
    double residual = 0.0;       // largest |model − fair| at the solution
    int iterations = 0;
};

// Without a total line: the two equations P(home) = fair_home, P(away) = fair_away, solved by
// Newton's method in log λ. With a line: least squares over home, away and over (Gauss–Newton
// with step halving). Throws std::invalid_argument for unusable prices and
// std::runtime_error when the model cannot reach the fair probabilities.
[[nodiscard]] PriorFromPrices prior_from_prices(
    const PriceBook& book, MarginMethod method,
    const PreMatchModel& model = independent_poisson_model());

// Inverse of the above for fair books: decimal prices 1/p (no margin).
[[nodiscard]] PriceBook fair_prices(double lambda_home, double lambda_away,
                                    std::optional<double> total_line,
                                    const PreMatchModel& model = independent_poisson_model());

}  // namespace liveprob::fit
