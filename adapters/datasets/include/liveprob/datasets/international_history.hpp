// The whole international record as a rating reference needs it: every result with its
// competition (results.csv, the same rows the rating fit reads, results_readers.hpp: a fixture
// not played is skipped, an unreadable row an error unless `bad_rows` skips it, a repeated
// (date, home, away) dropped), and the minute of every regulation goal the
// goal scorers file records (goalscorers.csv: minutes 1..90, whatever the match's other records).
#pragma once

#include <string>
#include <vector>

#include "liveprob/datasets/results_readers.hpp"

namespace liveprob::datasets {

struct DatedGoalMinute {
    int day = 0;
    int minute = 0;  // 1..90
};

struct InternationalHistory {
    std::vector<CompetitionResult> results;  // in file order
    std::vector<DatedGoalMinute> goal_minutes;
    int skipped = 0, duplicates = 0;  // results rows not played or skipped; repeats dropped
};

// `dir` holds results.csv and goalscorers.csv. Throws std::runtime_error naming the file when
// one cannot be read or lacks a column.
InternationalHistory read_international_history(const std::string& dir,
                                                BadRows bad_rows = BadRows::fail);

}  // namespace liveprob::datasets
