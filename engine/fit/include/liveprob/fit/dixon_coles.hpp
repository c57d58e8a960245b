// Team ratings from past results: Dixon & Coles (1997).
//
//   goals of home side i against away side j ~ Poisson(λ), λ = exp(μ + h·[not neutral] + a_i − d_j)
//   goals of away side j                      ~ Poisson(ν), ν = exp(μ + a_j − d_i)
//
// with the attack a and defence d of every team summing to zero (the identifiability
// constraint), an optional low-score correction τ(x, y; λ, ν, ρ) and time-decayed likelihood
// weights exp(−ξ·(as_of − day)). Fitted by Newton's method on the Poisson information
// (= iteratively reweighted least squares for this log-link model): the diagonal attack block
// is eliminated, the rest is built from the pairs of teams that met and factored by Cholesky
// (engine/fit/src/rating_newton.hpp); ρ is fitted by alternating with a one-dimensional
// bisection on the concave τ log-likelihood.
//
// Teams in groups that never met (directly or through common opponents) cannot be compared:
// the fit warns, and centres each group other than the largest on the average. A warm start
// (`start`) is a hint only: when the fit from it does not converge, it starts again from cold.
#pragma once

#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "liveprob/fit/match_result.hpp"

namespace liveprob::fit {

// Dixon & Coles (1997), eq. (4.2): the dependence correction of the four low scores.
[[nodiscard]] double dixon_coles_tau(int home_goals, int away_goals, double lambda_home,
                                     double lambda_away, double rho) noexcept;

struct TeamRating {
    std::string name;
    double attack = 0.0;
    double defence = 0.0;  // larger = concedes fewer
    double attack_se = 0.0;
    double defence_se = 0.0;
    int matches = 0;                // matches used
    double weighted_matches = 0.0;  // sum of their decay weights
    bool shrunk = false;            // too few matches: rating pulled toward the average
};

struct FitDiagnostics {
    double log_likelihood = 0.0;  // weighted, including −log(y!) terms and τ; no penalty
    int matches = 0;
    int iterations = 0;  // Newton iterations, all ρ rounds together
    bool converged = false;
    std::vector<std::string> warnings;
};

struct Ratings {
    double intercept = 0.0;  // μ
    double home_advantage = 0.0;
    double rho = 0.0;
    double xi = 0.0;  // decay per day used
    double intercept_se = 0.0;
    double home_advantage_se = 0.0;
    double rho_se = 0.0;
    std::optional<int> as_of_day;   // only matches strictly before this day were used
    std::vector<TeamRating> teams;  // sorted by name
    FitDiagnostics diagnostics;

    [[nodiscard]] const TeamRating* find(std::string_view name) const noexcept;
};

struct RatingsFitOptions {
    double xi = 0.0;  // time decay per day (0 = every match weighs the same)
    bool fit_rho = false;
    std::optional<int> as_of_day;  // use matches with day < as_of_day only
    // Teams whose weighted match count is below `min_matches` get a Gaussian prior of
    // precision `shrink_precision` on attack and defence (toward the average, 0) and a warning.
    double min_matches = 0.0;
    double shrink_precision = 2.0;
    // Every team's goal level a − d (how many goals its matches hold, apart from who wins them)
    // gets a Gaussian prior of this precision toward the average; its strength a + d does not.
    // 0 = no level shrinkage. The precision is in the units of the Poisson information: n
    // weighted matches at about λ goals a side carry about n·λ/2 of information on a − d (a
    // national side at a two-year half-life: about 25 · 1.3 / 2 ≈ 16).
    double level_precision = 0.0;
    // A friendly's likelihood weight relative to a competitive match (on top of the decay).
    double friendly_weight = 1.0;
    double min_weight = 1e-6;  // decayed matches lighter than this are left out
    int max_iterations = 100;
    double tolerance = 1e-11;  // largest Newton step at convergence
    bool standard_errors = true;
    const Ratings* start = nullptr;  // warm start (teams matched by name)
};

struct ExpectedGoals {
    double home = 0.0;
    double away = 0.0;
};

[[nodiscard]] ExpectedGoals expected_goals(const Ratings& ratings, const TeamRating& home,
                                           const TeamRating& away, bool neutral) noexcept;

// Home win, draw, away win of independent Poisson scores with the Dixon–Coles τ applied to the
// four low scores (τ leaves both margins unchanged, so the grid still sums to 1).
struct OutcomeProbabilities {
    double home = 0.0, draw = 0.0, away = 0.0;
};
[[nodiscard]] OutcomeProbabilities outcome_probabilities(double lambda_home, double lambda_away,
                                                         double rho);

// Throws std::invalid_argument when no match is usable.
[[nodiscard]] Ratings fit_ratings(std::span<const MatchResult> matches,
                                  const RatingsFitOptions& options);

}  // namespace liveprob::fit
