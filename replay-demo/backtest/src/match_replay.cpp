#include "liveprob/backtest/match_replay.hpp"

#include <algorithm>
#include <cmath>
#include <exception>
#include <optional>

#include "liveprob/core/match.hpp"

namespace liveprob::backtest {

const char* forecaster_name(Forecaster f) noexcept {
    switch (f) {
        case Forecaster::model: return "model";
        case Forecaster::fixed_prior: return "fixed_prior";
        case Forecaster::uniform_timing_no_state: return "uniform_timing_no_state";
    }
    return "unknown";
}

core::ModelParams uniform_timing_no_state(const core::ModelParams& params) {
    core::ModelParams flat = params;
    flat.timing.first_half_start = flat.timing.first_half_end = 1.0;
    flat.timing.second_half_start = flat.timing.second_half_end = 1.0;
    flat.timing.stoppage_factor = 1.0;
    flat.timing.extra_time_factor = 1.0;
    flat.score_state = {1.0, 1.0, 1.0};
    flat.red_cards = {1.0, 1.0, 0};
    return flat;
}

namespace {

scoring::Forecast forecast_of(const core::Outputs& out) {
    return {out.p_home, out.p_draw, out.p_away};
}

// Finite, at least -1e-12 (rounding of 1 - x), summing to 1 within 1e-9.
bool valid(const core::Outputs& out) {
    const double sum = out.p_home + out.p_draw + out.p_away;
    return std::isfinite(sum) && std::abs(sum - 1.0) < 1e-9 &&
           std::min({out.p_home, out.p_draw, out.p_away}) >= -1e-12;
}

double minutes_of(const core::MatchClock& clock) {
    return static_cast<double>(clock.clock_ms) / 60'000.0;
}

void mark(Timeline& timeline, const core::InboundMessage& m) {
    const double minute = minutes_of(m.header.clock);
    if (const auto* goal = std::get_if<core::Goal>(&m.body)) {
        timeline.marks.push_back({minute, TimelineMark::Kind::goal, goal->side});
    } else if (const auto* red = std::get_if<core::RedCard>(&m.body)) {
        timeline.marks.push_back({minute, TimelineMark::Kind::red_card, red->side});
    } else if (std::holds_alternative<core::GoalCancelled>(m.body)) {
        timeline.marks.push_back({minute, TimelineMark::Kind::goal_cancelled, core::Side::home});
    }
}

}  // namespace

core::MatchClock bucket_clock(const core::CompetitionFormat& format, int bucket) {
    const int minute = scoring::kBucketMinutes[static_cast<std::size_t>(bucket)];
    const auto ms = static_cast<std::uint32_t>(minute) * 60'000U;
    return {minute <= format.half_minutes ? core::Period::first_half : core::Period::second_half,
            ms};
}

bool bucket_passed(const core::MatchClock& bucket, const core::MatchClock& message_clock,
                   bool ends_play) {
    return clock_before(bucket, message_clock) ||
           (ends_play && !clock_before(message_clock, bucket));
}

MatchReplay replay_match(const std::vector<core::InboundMessage>& messages,
                         const core::ModelParams& params, const core::ModelParams& baseline_params,
                         ReplayChoices choices) {
    MatchReplay out;
    if (messages.empty() || !std::holds_alternative<core::MatchSetup>(messages.front().body)) {
        out.problem = "no match setup before the feed";
        if (!messages.empty()) out.match_id = messages.front().header.match_id;
        return out;
    }
    out.match_id = messages.front().header.match_id;
    const auto& setup = std::get<core::MatchSetup>(messages.front().body);
    std::optional<core::Match> model, baseline;
    try {
        model.emplace(out.match_id, setup, params);
        baseline.emplace(out.match_id, setup, baseline_params);
    } catch (const std::exception& e) {
        out.problem = e.what();
        return out;
    }
    if (choices.keep_timeline) out.timeline = Timeline{setup.home_name, setup.away_name, {}, {}};

    auto evaluate = [&]() -> const core::Outputs& {
        const core::Outputs& o = model->outputs();
        ++out.evaluations;
        if (!valid(o)) ++out.invalid_outputs;
        return o;
    };
    auto record_bucket = [&](int bucket) {
        auto& slot = out.forecasts[static_cast<std::size_t>(bucket)];
        slot[static_cast<std::size_t>(Forecaster::model)] = forecast_of(evaluate());
        slot[static_cast<std::size_t>(Forecaster::uniform_timing_no_state)] =
            forecast_of(baseline->outputs());
    };
    // Kick-off: the pre-match forecast, which the fixed-prior baseline keeps for every bucket.
    record_bucket(0);
    const scoring::Forecast prior = forecast_of(model->outputs());
    if (out.timeline) out.timeline->points.push_back({0.0, prior});

    int next_bucket = 1;
    for (std::size_t i = 1; i < messages.size(); ++i) {
        const auto& m = messages[i];
        while (next_bucket < scoring::kBuckets) {
            const auto at = bucket_clock(setup.format, next_bucket);
            // A bucket is read before the first message after its minute, or before the end
            // of play that comes exactly at it.
            const bool ends_play = std::holds_alternative<core::PeriodEnd>(m.body) ||
                                   std::holds_alternative<core::FinalWhistle>(m.body);
            if (!bucket_passed(at, m.header.clock, ends_play) ||
                model->outputs().status == core::MatchStatus::finished ||
                model->outputs().status == core::MatchStatus::abandoned) {
                break;
            }
            // Priced there already (a message at the bucket's minute): the outputs stand, and
            // moving the clock onto itself would only price them again. A clock that cannot
            // move there (stopped, another period) leaves the last priced outputs: what a
            // subscriber would have seen at that minute.
            if (!(model->priced_clock() == at)) (void)model->advance_to(at);
            if (!(baseline->priced_clock() == at)) (void)baseline->advance_to(at);
            record_bucket(next_bucket++);
            if (out.timeline)
                out.timeline->points.push_back(
                    {minutes_of(model->priced_clock()), forecast_of(model->outputs())});
        }
        const auto verdict = model->apply(m).verdict;
        (void)baseline->apply(m);  // the same stream: its verdict is the model's
        ++out.messages;
        if (verdict == core::Verdict::rejected) ++out.rejected;
        if (verdict == core::Verdict::duplicate) ++out.duplicates;
        if (verdict == core::Verdict::late) ++out.late;
        if (choices.every_event &&
            (verdict == core::Verdict::accepted || verdict == core::Verdict::late))
            evaluate();
        if (out.timeline &&
            (verdict == core::Verdict::accepted || verdict == core::Verdict::late)) {
            mark(*out.timeline, m);
            if (model->outputs().status != core::MatchStatus::finished &&
                model->outputs().status != core::MatchStatus::shootout) {
                out.timeline->points.push_back(
                    {minutes_of(m.header.clock), forecast_of(model->outputs())});
            }
        }
    }
    for (auto& slot : out.forecasts)
        slot[static_cast<std::size_t>(Forecaster::fixed_prior)] =
            slot[static_cast<std::size_t>(Forecaster::model)]
                ? std::optional<scoring::Forecast>(prior)
                : std::nullopt;

    const auto status = model->outputs().status;
    out.fate = status == core::MatchStatus::finished    ? ReplayFate::scored
               : status == core::MatchStatus::abandoned ? ReplayFate::abandoned
                                                        : ReplayFate::unfinished;
    out.regulation_goals = model->state().regulation_goals;
    out.result = scoring::outcome_of(out.regulation_goals[0], out.regulation_goals[1]);
    return out;
}

}  // namespace liveprob::backtest
