// The naive Elo reference every report sets beside the model: what a simple, well-known rating
// gives without any in-play machinery.
//
// 1. Ratings: the Elo rating system for national football teams as commonly published (the
//    "World Football Elo Ratings" formula; constants from memory, as the project's issue states
//    them): after a match, R_new = R_old + K * G * (W - W_e), where W is 1 / 0.5 / 0 for a win /
//    draw / loss, W_e = 1 / (10^(-dr/400) + 1) with dr the rating difference plus 100 for the
//    side at home (none at a neutral venue), K = 60 for world finals, 50 for other tournaments,
//    40 for qualifiers, 20 for friendlies, and G = 1 for a goal difference of 0 or 1, 1.5 for 2,
//    (11 + N) / 8 for N >= 3. New teams start at 1500 (common practice). Walk-forward: a match
//    is priced with the ratings after every result strictly before its day.
// 2. Expected goals: log-linear in the rating difference, log mu_home = a_h + b_h * dr/400 and
//    log mu_away = a_a + b_a * dr/400, fitted by Poisson maximum likelihood on the results of
//    the `map_years` years before 1 January of the match's year (refitted each year).
// 3. In play: independent Poisson goals for the share of goals still to come, that share read
//    from the empirical goal-minute histogram of every goal recorded before that 1 January.
#pragma once

#include <array>
#include <optional>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "liveprob/backtest/match_replay.hpp"
#include "liveprob/fit/match_result.hpp"
#include "liveprob/scoring/bucket_scores.hpp"

namespace liveprob::backtest {

enum class EloMatchClass : std::uint8_t { world_finals, tournament, qualifier, friendly };
// The international source's competition names: `world_finals` names the world finals, a name
// containing "qualification" is a qualifier, "Friendly" a friendly, any other a tournament.
EloMatchClass elo_match_class(std::string_view competition, std::string_view world_finals) noexcept;
// The world finals as the record shows them, with no name written into the project: the
// competition whose qualifying rounds ("<name> qualification") have the most results.
std::string world_finals_in(std::span<const std::string> competitions);

struct EloSettings {
    std::array<double, 4> k{60.0, 50.0, 40.0, 20.0};  // by EloMatchClass
    double home_advantage = 100.0;
    double start_rating = 1500.0;
    int map_years = 10;
};

// W_e: the expected result of the side whose rating (home advantage included) exceeds the
// other's by `rating_difference`.
double elo_expected_result(double rating_difference) noexcept;
// G: the goal-difference multiplier.
double elo_goal_multiplier(int goal_difference) noexcept;
// The points the home side gains (the away side loses them) from one result.
double elo_points_exchanged(double rating_difference, int home_goals, int away_goals,
                            double k) noexcept;

struct EloResult {
    fit::MatchResult result;
    EloMatchClass match_class = EloMatchClass::friendly;
};

// Poisson means log-linear in the rating difference (dr / 400).
struct EloGoalsMap {
    double home_intercept = 0.0, home_slope = 0.0;
    double away_intercept = 0.0, away_slope = 0.0;
    std::size_t matches = 0;  // results it was fitted on
    std::array<double, 2> expected(double rating_difference) const noexcept;
};
// Poisson maximum likelihood (Newton's method) of home goals on (1, dr/400) and of away goals on
// the same; throws std::runtime_error when fewer than 10 results are given.
EloGoalsMap fit_elo_goals_map(std::span<const double> rating_difference,
                              std::span<const int> home_goals, std::span<const int> away_goals);

// Minutes of the goal-minute histogram the engine's streams have shown by each bucket's reading:
// the imported streams place source minute m at (m-1):30, and the source's minutes 45 and 90
// (which hold that half's stoppage) after 45:00 and 90:00. Bucket b has seen minutes
// 1..kMinutesSeenAtBucket[b].
inline constexpr std::array<int, scoring::kBuckets> kMinutesSeenAtBucket{0,  15, 30, 44,
                                                                         60, 75, 85, 89};
// Share of a histogram over minutes 1..90 not yet seen at each bucket.
std::array<double, scoring::kBuckets> remaining_share(const std::array<double, 90>& histogram);

struct EloFixture {
    int day = 0;
    std::string home, away;
    bool neutral = false;
};
struct GoalMinute {
    int day = 0;
    int minute = 0;  // 1..90 regulation (others are ignored)
};

struct EloReference {
    // Per fixture, in the fixtures' order; empty when its year has too little earlier data (no
    // map could be fitted, or no goal minutes before it).
    std::vector<std::optional<ReferenceMeans>> means;
    std::vector<double> rating_difference;          // per fixture, home advantage included
    std::vector<std::pair<int, EloGoalsMap>> maps;  // by year
};

// `results` in any order (ties within a day: all priced before any is applied), `fixtures` in
// any order.
EloReference elo_reference(std::span<const EloResult> results,
                           std::span<const GoalMinute> goal_minutes,
                           std::span<const EloFixture> fixtures, const EloSettings& settings = {});

}  // namespace liveprob::backtest
