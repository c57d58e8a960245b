// The whole international record as a rating reference needs it: every result with its
// competition (results.csv, the same rows the rating fit reads: a row without a score is
// skipped, a repeated (date, home, away) dropped), and the minute of every regulation goal the
// goal scorers file records (goalscorers.csv: minutes 1..90, whatever the match's other records).
#pragma once

#include <string>
#include <vector>

#include "liveprob/fit/match_result.hpp"

namespace liveprob::datasets {

struct CompetitionResult {
    fit::MatchResult result;
    std::string competition;  // the source's tournament name
    int line = 0;             // line of results.csv
};

struct DatedGoalMinute {
    int day = 0;
    int minute = 0;  // 1..90
};

struct InternationalHistory {
    std::vector<CompetitionResult> results;  // in file order
    std::vector<DatedGoalMinute> goal_minutes;
    int skipped = 0, duplicates = 0;  // results rows without a score; repeats dropped
};

// `dir` holds results.csv and goalscorers.csv. Throws std::runtime_error naming the file when
// one cannot be read or lacks a column.
InternationalHistory read_international_history(const std::string& dir);

}  // namespace liveprob::datasets
