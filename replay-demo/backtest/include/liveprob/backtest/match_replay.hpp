// Replays one match's messages through the engine and collects what the scores need: the
// forecast of each forecaster at each bucket minute, the regulation result, and (on request)
// the probability timeline.
#pragma once

#include <array>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "liveprob/core/messages.hpp"
#include "liveprob/core/params.hpp"
#include "liveprob/scoring/bucket_scores.hpp"
#include "liveprob/scoring/scoring_rules.hpp"

namespace liveprob::backtest {

// The forecasters scored side by side in one run.
enum class Forecaster : std::uint8_t {
    model = 0,                    // the full engine with the given parameters
    fixed_prior = 1,              // the pre-match forecast, never updated
    uniform_timing_no_state = 2,  // the engine with a flat goal-timing profile and no
                                  // score-state or red-card effects
};
inline constexpr int kForecasters = 3;
const char* forecaster_name(Forecaster f) noexcept;

// The baseline's parameters: `params` with a uniform timing profile and every state effect 1.
core::ModelParams uniform_timing_no_state(const core::ModelParams& params);

struct TimelinePoint {
    double minute = 0.0;           // running match clock in minutes
    scoring::Forecast forecast{};  // full model
};

struct TimelineMark {
    double minute = 0.0;
    enum class Kind : std::uint8_t { goal, goal_cancelled, red_card } kind = Kind::goal;
    core::Side side = core::Side::home;
};

struct Timeline {
    std::string home_name, away_name;
    std::vector<TimelinePoint> points;
    std::vector<TimelineMark> marks;
};

enum class ReplayFate : std::uint8_t {
    scored = 0,      // finished: scored
    abandoned = 1,   // not scored
    unfinished = 2,  // the stream stops before the final whistle: not scored
    unusable = 3,    // no setup, or the engine refused the setup
};

struct MatchReplay {
    std::uint64_t match_id = 0;
    ReplayFate fate = ReplayFate::unusable;
    std::string problem;                               // why unusable
    scoring::Outcome result = scoring::Outcome::draw;  // regulation result, when scored
    std::array<int, 2> regulation_goals{};
    // Forecast per bucket and forecaster; empty where the match never reached the minute.
    std::array<std::array<std::optional<scoring::Forecast>, kForecasters>, scoring::kBuckets>
        forecasts{};
    std::uint64_t messages = 0, rejected = 0, duplicates = 0, late = 0;
    std::uint64_t evaluations = 0, invalid_outputs = 0;  // see BacktestResult
    std::optional<Timeline> timeline;
};

struct ReplayChoices {
    bool keep_timeline = false;
    bool every_event = false;  // price the model after every accepted event too
};

// `messages`: the match's setup first, then its feed in arrival order.
MatchReplay replay_match(const std::vector<core::InboundMessage>& messages,
                         const core::ModelParams& params, const core::ModelParams& baseline_params,
                         ReplayChoices choices);

// The clock at which a bucket's forecast is read: its minute of the running clock, in the half
// that minute belongs to (45:00 is the end of the first half's nominal time).
core::MatchClock bucket_clock(const core::CompetitionFormat& format, int bucket);

// Whether the clock has passed a bucket once a message at `message_clock` arrives: it is later,
// or it ends play (`ends_play`: the end of a period or the final whistle) exactly at the bucket.
bool bucket_passed(const core::MatchClock& bucket, const core::MatchClock& message_clock,
                   bool ends_play);

}  // namespace liveprob::backtest
