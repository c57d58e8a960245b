// DIR/report.json: per bucket, n and every score for the model and each baseline, with the
// calibration bins. Layout:
//   { "kind": "liveprob-replay-report", "version": 1,
//     "matches": { "total", "scored", "abandoned", "unfinished", "unusable" },
//     "messages": { "total", "rejected", "duplicates", "late" },
//     "forecasters": [ "model", "fixed_prior", "uniform_timing_no_state" ],
//     "buckets": [ { "minute": 0, "label": "0", "n": 380,
//                    "model": { "brier", "log_loss", "rps", "ece",
//                               "ece_by_outcome": { "home", "draw", "away" },
//                               "calibration": { "home": [ { "bin", "low", "high", "n",
//                                   "mean_forecast", "observed_rate" } x 10 ], "draw", "away" } },
//                    "fixed_prior": { ... }, "uniform_timing_no_state": { ... },
//                    "independent_poisson": { ... }, "elo_reference": { ... } }, ... ],
//     with a comparison also:
//     "comparison": { "matches", "seed", "resamples", "level", "calibration_draws", "min_group",
//                     "per_match_csv": "matches.csv", "columns": [ names ],
//                     "buckets": [ { "minute", "label",
//                                    "scores": { column: { "n", "rps", "brier", "log_loss", "ece",
//                                          "ece_calibrated_mean", "ece_calibrated_p95" } },
//                                    "model_against": { column: { "n", "difference",
//                                          "difference_low", "difference_high", "relative",
//                                          "relative_low", "relative_high", "separated" } } } ],
//                     "by_competition": [ { "group", "matches", "too_small",
//                                           "buckets": [ { "label", "scores", "model_against" } ] }
//                                           ],
//                     "by_year": [ same ], "warnings": [ lines ] },
//     "inputs": { "program_version", "command_line", "files": [ { "role", "path", "sha256" } ] } }
#pragma once

#include <string>

#include "liveprob/backtest/backtest.hpp"
#include "liveprob/report/comparison_report.hpp"

namespace liveprob::report {

// What an in-process replay adds to its report: the forecasters compared match by match.
struct Comparison {
    backtest::ScoredTable table;
    backtest::Evaluation evaluation;
    RunInputs inputs;
};

// With a comparison, also its members "comparison" (comparison_report.hpp) and "inputs".
std::string report_json(const backtest::BacktestResult& result,
                        const Comparison* comparison = nullptr);

}  // namespace liveprob::report
