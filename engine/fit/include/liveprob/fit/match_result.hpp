// One finished match as the rating fit sees it.
#pragma once

#include <string>

namespace liveprob::fit {

struct MatchResult {
    int day = 0;  // day number (see calendar.hpp)
    std::string home;
    std::string away;
    int home_goals = 0;
    int away_goals = 0;
    bool neutral = false;  // neutral venue: no home advantage term
    // The source calls it a friendly (the international results' tournament "Friendly"): sides
    // often field a changed team, so it may tell less about strength (RatingsFitOptions).
    bool friendly = false;
};

}  // namespace liveprob::fit
