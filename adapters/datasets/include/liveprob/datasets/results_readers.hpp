// Readers of past results for the rating fit:
//  - the project's own results CSV (columns documented in tools/README-fit.md):
//      date,home,away,home_goals,away_goals,neutral[,competition]
//    strict: a malformed row is an error naming the file, line and reason;
//  - the open international results CSV (date,home_team,away_team,home_score,away_score,
//    tournament,city,country,neutral; full time including extra time);
//  - the open league JSON files ({"matches":[{date, team1, team2, score:{ft:[h,a]}}]}).
// The open formats are read leniently: a row without a final score (an unplayed match) is
// skipped and counted. In every format a repeated (date, home, away) is counted and dropped.
#pragma once

#include <string>
#include <vector>

#include "liveprob/fit/match_result.hpp"

namespace liveprob::datasets {

struct ResultsRead {
    std::vector<fit::MatchResult> matches;  // in file order
    int skipped = 0;                        // rows without a usable result (open formats only)
    int duplicates = 0;                     // repeated (date, home, away)
};

ResultsRead read_project_results(const std::string& path);
ResultsRead read_international_results(const std::string& path);
ResultsRead read_league_json(const std::string& path);
// Chooses by content: a ".json" file is a league file; a CSV whose header starts with
// "date,home_team" is the international format; any other CSV is the project's format.
ResultsRead read_results_any(const std::string& path);

}  // namespace liveprob::datasets
