// Readers of past results for the rating fit:
//  - the project's own results CSV (columns documented in tools/README-fit.md):
//      date,home,away,home_goals,away_goals,neutral[,competition]
//  - the open international results CSV (date,home_team,away_team,home_score,away_score,
//    tournament,city,country,neutral; full time including extra time);
//  - the open league JSON files ({"matches":[{date, team1, team2, score:{ft:[h,a]}}]});
//  - the open championship JSON files (match_timelines.hpp): every match with a final score.
// A row that cannot be read (an unreadable date or score, a negative score, a missing column,
// an empty team name) is an error naming the file, line and reason, or, with BadRows::skip,
// skipped and counted. A match the source marks as not played is skipped and counted: "NA" as
// both scores in the international file (a fixture not yet played), no final score or the
// status "cancelled" or "awarded" (a result given at a desk, not played) in a JSON file. In
// every format a repeated (date, home, away) is counted and dropped.
#pragma once

#include <cstdint>
#include <span>
#include <string>
#include <vector>

#include "liveprob/fit/match_result.hpp"

namespace liveprob::datasets {

enum class BadRows : std::uint8_t {
    fail,  // an error naming the file and line (the default)
    skip,  // skipped and counted
};

struct ResultsRead {
    std::vector<fit::MatchResult> matches;  // in file order
    int skipped = 0;                        // matches the source marks as not played (see above)
    int bad_skipped = 0;                    // unreadable rows skipped under BadRows::skip
    int duplicates = 0;                     // repeated (date, home, away)
};

// One row of the international results with what the rating reference also needs.
struct CompetitionResult {
    fit::MatchResult result;
    std::string competition;  // the source's tournament name
    int line = 0;             // line of results.csv
};

struct InternationalRows {
    std::vector<CompetitionResult> rows;  // in file order
    int unplayed = 0;                     // "NA" as both scores
    int bad_skipped = 0;                  // under BadRows::skip
    int duplicates = 0;
    std::vector<int> unplayed_days, duplicate_days;  // the days of those rows
};

InternationalRows read_international_rows(const std::string& path, BadRows bad = BadRows::fail);

ResultsRead read_project_results(const std::string& path, BadRows bad = BadRows::fail);
ResultsRead read_international_results(const std::string& path, BadRows bad = BadRows::fail);
ResultsRead read_league_json(const std::string& path, BadRows bad = BadRows::fail);
ResultsRead read_championship_results(const std::string& path);
// Chooses by content: a ".json" file with "rounds" (or a list at the top) is a championship
// file, any other ".json" a league file; a CSV whose header starts with "date,home_team" is the
// international format; any other CSV is the project's format.
ResultsRead read_results_any(const std::string& path, BadRows bad = BadRows::fail);

// Appends the results of `more` that `into` does not hold already: the same day and the same
// two sides, in either order (a neutral-venue match may name its sides the other way round in
// another source). Returns how many were already there.
int append_new_results(std::vector<fit::MatchResult>& into, std::span<const fit::MatchResult> more);

}  // namespace liveprob::datasets
