// Pre-match priors fitted walk-forward: each match gets the expected regulation goals of the
// Dixon–Coles ratings fitted on the results strictly before its day (the `fit --as-of` rule),
// so no forecast uses anything that happened on or after its own day.
#pragma once

#include <cstddef>
#include <functional>
#include <span>
#include <string>
#include <vector>

#include "liveprob/core/messages.hpp"
#include "liveprob/core/validate.hpp"
#include "liveprob/fit/dixon_coles.hpp"
#include "liveprob/fit/match_result.hpp"

namespace liveprob::backtest {

struct FixtureToPrice {
    int day = 0;  // day number
    std::string home, away;
    bool neutral = false;
    // A side without a result before the day is rated as the mean of those of its stand-ins the
    // fit rates (a side promoted into a league: the sides relegated the season before), else
    // as the average side.
    std::vector<std::string> home_stand_ins, away_stand_ins;
};

enum class RefitSchedule : std::uint8_t {
    match_day,  // one fit per distinct match day, on everything before that day
    month,      // one fit per month with matches, on everything before the month's first day
                // (also strictly before every match of the month; fewer fits, older data)
};

struct WalkForwardOptions {
    fit::RatingsFitOptions fit;  // decay, shrinkage, ...; as_of_day and start are set per refit
    RefitSchedule schedule = RefitSchedule::match_day;
    // Expected goals beyond this are held at it (the largest prior the engine takes, as
    // `liveprob prior` holds it too).
    double max_expected_goals = core::kMaxPriorGoals;
    // The refits are split into this many stretches of consecutive days, each a chain of fits
    // warm-started from the one before (the first cold), run side by side on up to `threads`
    // threads. The priors depend on the number of chains only within the fit's convergence
    // tolerance, and not at all on the number of threads.
    unsigned chains = 2;
    unsigned threads = 2;
    // Called from the calling thread with (refits done, refits in all), after each refit it
    // makes and once at the end.
    std::function<void(std::size_t, std::size_t)> progress;
};

struct WalkForwardPriors {
    std::vector<core::PriorMeans> priors;  // one per fixture, in the fixtures' order
    // Per fixture: both sides were rated from at least `fit.min_matches` weighted matches (not
    // shrunk, not unrated), so the prior rests on their own results.
    std::vector<bool> both_sides_rated;
    std::size_t refits = 0;
    std::size_t not_converged = 0;    // refits whose Newton iterations did not converge
    std::size_t unrated_sides = 0;    // sides with no result before the day: rated as average
    std::size_t stood_in_sides = 0;   // of those, rated as the mean of their stand-ins
    std::size_t held_at_maximum = 0;  // expected goals held at max_expected_goals
    std::size_t no_history = 0;       // fixtures before any usable result: no prior (0, 0)
};

// `fixtures` in any order. A fixture whose day has no earlier result gets PriorMeans{0, 0} and
// is counted in `no_history` (the engine refuses such a setup; callers leave it out).
WalkForwardPriors walk_forward_priors(std::span<const fit::MatchResult> history,
                                      std::span<const FixtureToPrice> fixtures,
                                      const WalkForwardOptions& options);

}  // namespace liveprob::backtest
