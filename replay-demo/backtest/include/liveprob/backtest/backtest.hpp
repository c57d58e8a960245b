// Replays many matches on all cores and adds up their scores. The result does not depend on
// the number of threads: matches are scored into their own slots, then added in stream order.
#pragma once

#include <array>
#include <cstdint>
#include <functional>
#include <string>
#include <unordered_map>
#include <vector>

#include "liveprob/backtest/match_replay.hpp"
#include "liveprob/backtest/recorded_stream.hpp"
#include "liveprob/core/messages.hpp"
#include "liveprob/core/params.hpp"
#include "liveprob/scoring/bucket_scores.hpp"

namespace liveprob::backtest {

// One match's messages, its setup moved first; matches in order of first appearance.
using MatchMessages = std::vector<core::InboundMessage>;
std::vector<MatchMessages> group_by_match(const std::vector<core::InboundMessage>& messages);

struct BacktestOptions {
    core::ModelParams params;
    unsigned threads = 1;
    std::size_t timelines = 12;  // keep the timelines of this many scored matches (the first)
    // Also price the model after every accepted event, as serve publishes it (the whole live
    // path's work), and check each of those outputs (finite, summing to 1).
    bool every_event = false;
    // The Elo reference's means by match id (matches without an entry get no Elo forecast).
    const std::unordered_map<std::uint64_t, ReferenceMeans>* elo = nullptr;
    // Called from the calling thread about ten times a second, and once at the end.
    std::function<void(std::size_t done, std::size_t total)> progress;
};

struct BacktestResult {
    std::array<std::array<scoring::ScoreAccumulator, kForecasters>, scoring::kBuckets> scores{};
    std::uint64_t matches = 0, scored = 0, abandoned = 0, unfinished = 0, unusable = 0;
    std::uint64_t messages = 0, rejected = 0, duplicates = 0, late = 0;
    std::uint64_t evaluations = 0;  // model outputs read (buckets, and events on request)
    std::uint64_t invalid_outputs =
        0;  // of those, not finite, below -1e-12 or not summing to 1 (1e-9)
    std::vector<Timeline> timelines;
    std::vector<std::string> problems;  // one line per unusable match (the first few)

    const scoring::ScoreAccumulator& at(int bucket, Forecaster f) const {
        return scores[static_cast<std::size_t>(bucket)][static_cast<std::size_t>(f)];
    }
};

// Every match replayed in process on `options.threads` threads, one result per match in stream
// order (the same whatever the number of threads).
std::vector<MatchReplay> replay_matches(const std::vector<MatchMessages>& matches,
                                        const BacktestOptions& options);

// Adds up per-match results in order, keeping the timelines of the first `timelines` scored.
BacktestResult sum_replays(const std::vector<MatchReplay>& replays, std::size_t timelines);

// replay_matches, then sum_replays.
BacktestResult run_backtest(const std::vector<MatchMessages>& matches,
                            const BacktestOptions& options);

}  // namespace liveprob::backtest
