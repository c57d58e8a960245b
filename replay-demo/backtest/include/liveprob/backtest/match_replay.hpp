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
    independent_poisson = 3,      // the same priors and timing profile, no score-state or
                                  // red-card effects, no strength update (kappa infinite):
                                  // what the in-play machinery must beat
    elo_reference = 4,            // the naive Elo reference (elo_reference.hpp), when the
                                  // replay is given its means; absent otherwise
};
inline constexpr int kForecasters = 5;
const char* forecaster_name(Forecaster f) noexcept;

// The baseline's parameters: `params` with a uniform timing profile and every state effect 1.
core::ModelParams uniform_timing_no_state(const core::ModelParams& params);
// Independent Poisson on the same priors and timing: `params` with every state effect 1 and
// kappa infinite (the plain-Poisson settings of core::ModelParams::plain_poisson()).
core::ModelParams independent_poisson(const core::ModelParams& params);

// The parameters of the forecasters the engine prices, derived once per run.
struct ForecasterParams {
    core::ModelParams model, flat, independent;
    static ForecasterParams derived_from(const core::ModelParams& model);
};

// Expected goals of a reference forecaster that is not the engine: its pre-match means and, per
// bucket, the share of a match's goals still to come when that bucket is read.
struct ReferenceMeans {
    double home_goals = 0.0, away_goals = 0.0;
    std::array<double, scoring::kBuckets> remaining_share{};
};

// Home win / draw / away win when `score` stands and each side adds independent Poisson goals
// with the given means (the Skellam distribution of the difference, summed to 1e-15).
scoring::Forecast independent_poisson_outcome(const std::array<int, 2>& score, double home_mean,
                                              double away_mean);

// A chart places a minute by its period: stoppage runs past the period's nominal end on the
// running clock (45:00 + 2:13 is 47.2), and must not be drawn over the next period's start.
struct TimelinePoint {
    double minute = 0.0;           // running match clock in minutes
    scoring::Forecast forecast{};  // full model
    core::Period period = core::Period::pre_match;
};

struct TimelineMark {
    double minute = 0.0;
    enum class Kind : std::uint8_t { goal, goal_cancelled, red_card } kind = Kind::goal;
    core::Side side = core::Side::home;
    core::Period period = core::Period::pre_match;
};

struct Timeline {
    std::string home_name, away_name;
    std::vector<TimelinePoint> points;
    std::vector<TimelineMark> marks;
    std::uint16_t half_minutes = 45;  // the format's, for placing each period on a chart
    std::uint16_t extra_half_minutes = 15;
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
    std::int64_t scheduled_kickoff_us = 0;  // from the setup
    std::string home_name, away_name;
    // The score each bucket was read at (as the engine had it), where the match reached it.
    std::array<std::array<int, 2>, scoring::kBuckets> score_at_bucket{};
    // Forecast per bucket and forecaster; empty where the match never reached the minute, or
    // where its feed said nothing of the minutes before it (kMaxSilenceMinutes).
    std::array<std::array<std::optional<scoring::Forecast>, kForecasters>, scoring::kBuckets>
        forecasts{};
    std::uint64_t messages = 0, rejected = 0, duplicates = 0, late = 0;
    std::uint64_t evaluations = 0, invalid_outputs = 0;  // see BacktestResult
    std::optional<Timeline> timeline;
};

struct ReplayChoices {
    bool keep_timeline = false;
    bool every_event = false;             // price the model after every accepted event too
    const ReferenceMeans* elo = nullptr;  // the Elo reference's means for this match, if any
};

// `messages`: the match's setup first, then its feed in arrival order.
MatchReplay replay_match(const std::vector<core::InboundMessage>& messages,
                         const ForecasterParams& params, ReplayChoices choices);

// The clock at which a bucket's forecast is read: its minute of the running clock, in the half
// that minute belongs to (45:00 is the end of the first half's nominal time).
core::MatchClock bucket_clock(const core::CompetitionFormat& format, int bucket);

// A bucket is read only when the feed's last message before it is at most this many minutes
// older, in the same period: a feed that said nothing of a stretch of play (the league streams,
// which know the score at the interval only) cannot have told the model what happened in it,
// so the forecast is not scored there. The imported and demo streams carry a clock reading
// every five minutes, so every bucket of theirs is read.
inline constexpr std::uint32_t kMaxSilenceMinutes = 10;
bool heard_recently(const core::MatchClock& last_message, const core::MatchClock& bucket);

// Whether the clock has passed a bucket once a message at `message_clock` arrives: it is later,
// or it ends play (`ends_play`: the end of a period or the final whistle) exactly at the bucket.
bool bucket_passed(const core::MatchClock& bucket, const core::MatchClock& message_clock,
                   bool ends_play);

}  // namespace liveprob::backtest
