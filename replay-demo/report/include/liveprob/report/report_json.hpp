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
//                    "fixed_prior": { ... }, "uniform_timing_no_state": { ... } }, ... ] }
#pragma once

#include <string>

#include "liveprob/backtest/backtest.hpp"

namespace liveprob::report {

std::string report_json(const backtest::BacktestResult& result);

}  // namespace liveprob::report
