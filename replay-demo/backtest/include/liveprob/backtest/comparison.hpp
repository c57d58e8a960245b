// Forecasters side by side on the same matches: every scored match as one row (its forecasts at
// each bucket from the model, the baselines, the references and any further model
// configurations), then per bucket each forecaster's scores, its expected calibration error
// beside the one a perfectly calibrated forecaster would show at that n, and the model's RPS
// against each other forecaster's as a paired bootstrap difference; the same comparisons by
// competition and by year.
#pragma once

#include <array>
#include <cstdint>
#include <optional>
#include <string>
#include <unordered_map>
#include <vector>

#include "liveprob/backtest/match_replay.hpp"
#include "liveprob/scoring/bucket_scores.hpp"
#include "liveprob/scoring/calibration_null.hpp"
#include "liveprob/scoring/paired_bootstrap.hpp"

namespace liveprob::backtest {

// What the replay does not know about a match: where it was played for (the competition).
struct MatchFacts {
    std::string competition;
};

// A further model configuration, replayed on the same streams (or on streams holding the same
// matches, paired by match id).
struct ConfigurationRun {
    std::string name;
    const std::vector<MatchReplay>* replays = nullptr;
};

struct ScoredRow {
    std::uint64_t match_id = 0;
    int day = 0;  // from the scheduled kick-off (UTC)
    std::string competition, home, away;
    std::array<int, 2> regulation_goals{};
    scoring::Outcome result = scoring::Outcome::draw;
    // [bucket][column]
    std::array<std::vector<std::optional<scoring::Forecast>>, scoring::kBuckets> forecasts;
};

struct ScoredTable {
    // Column 0 is the model; then the other Forecasters in their order; then each configuration.
    std::vector<std::string> columns;
    std::vector<ScoredRow> rows;  // the matches the first run scored, in its order
};

// The first run's scored matches with every forecaster's forecasts, and each configuration's
// model forecasts for the same match ids (absent where that run did not score the match).
ScoredTable scored_table(const std::vector<MatchReplay>& primary,
                         const std::vector<ConfigurationRun>& configurations,
                         const std::unordered_map<std::uint64_t, MatchFacts>& facts);

struct EvaluationSettings {
    scoring::BootstrapSettings bootstrap;
    int calibration_draws = 200;  // outcome sets drawn for the perfectly calibrated ECE
    // Breakdown groups smaller than this are pooled into one "other" row (competitions) and
    // flagged as too small to tell forecasters apart (years).
    std::uint64_t min_group = 300;
};

struct ColumnScores {
    std::uint64_t n = 0;
    double rps = 0, brier = 0, log_loss = 0, ece = 0;
    scoring::CalibratedEce calibrated;  // ECE of a perfectly calibrated forecaster, same forecasts
    scoring::CalibrationTable calibration;
};

struct BucketEvaluation {
    std::vector<ColumnScores> columns;  // by column; n 0 where the column has no forecasts
    // The model (column 0) against each column (entry 0 unused: n 0), on the matches both have.
    std::vector<scoring::PairedDifference> model_against;
};

struct GroupEvaluation {
    std::string group;
    std::uint64_t matches = 0;
    bool too_small = false;
    std::array<BucketEvaluation, scoring::kBuckets> buckets;  // ECE without the calibrated draws
};

struct Evaluation {
    EvaluationSettings settings;
    std::vector<std::string> columns;
    std::uint64_t matches = 0;
    std::array<BucketEvaluation, scoring::kBuckets> buckets;
    std::vector<GroupEvaluation> by_competition, by_year;
    std::vector<std::string> warnings;  // one line each: where n cannot tell forecasters apart
};

Evaluation evaluate(const ScoredTable& table, const EvaluationSettings& settings);

}  // namespace liveprob::backtest
