// The comparison part of a report: forecasters side by side with paired intervals, ECE beside
// that of a perfectly calibrated forecaster, breakdowns by competition and by year, the inputs'
// fingerprints, and the per-match table (matches.csv).
#pragma once

#include <string>
#include <vector>

#include "liveprob/backtest/comparison.hpp"
#include "liveprob/protocol/json_writer.hpp"

namespace liveprob::report {

// One input a run read, so the report can be reproduced.
struct InputFingerprint {
    std::string role;  // "parameters", "stream", "reference data", ...
    std::string path;
    std::string sha256;
};

struct RunInputs {
    std::string program_version;
    std::string command_line;
    std::vector<InputFingerprint> files;
};

// matches.csv: one row per scored match; for every bucket and column the three probabilities
// (columns `<forecaster>@<bucket>:home|draw|away`), empty where a forecaster has none.
std::string matches_csv(const backtest::ScoredTable& table);

// The "comparison" and "inputs" members of report.json (written into an open object).
void write_comparison_json(protocol::JsonWriter& json, const backtest::Evaluation& evaluation);
void write_inputs_json(protocol::JsonWriter& json, const RunInputs& inputs);

// The HTML sections.
std::string comparison_html(const backtest::Evaluation& evaluation);
std::string inputs_html(const RunInputs& inputs);
std::string matches_html(const backtest::ScoredTable& table, std::size_t rows);

}  // namespace liveprob::report
