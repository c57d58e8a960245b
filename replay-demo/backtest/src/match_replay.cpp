#include "liveprob/backtest/match_replay.hpp"

#include <algorithm>
#include <cmath>
#include <exception>
#include <optional>
#include <vector>

#include "liveprob/core/match.hpp"

namespace liveprob::backtest {

const char* forecaster_name(Forecaster f) noexcept {
    switch (f) {
        case Forecaster::model: return "model";
        case Forecaster::fixed_prior: return "fixed_prior";
        case Forecaster::uniform_timing_no_state: return "uniform_timing_no_state";
        case Forecaster::independent_poisson: return "independent_poisson";
        case Forecaster::elo_reference: return "elo_reference";
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

core::ModelParams independent_poisson(const core::ModelParams& params) {
    const core::ModelParams plain = core::ModelParams::plain_poisson();
    core::ModelParams out = params;
    out.score_state = plain.score_state;
    out.red_cards = plain.red_cards;
    out.kappa = plain.kappa;
    return out;
}

ForecasterParams ForecasterParams::derived_from(const core::ModelParams& model) {
    return {model, uniform_timing_no_state(model), independent_poisson(model)};
}

scoring::Forecast independent_poisson_outcome(const std::array<int, 2>& score, double home_mean,
                                              double away_mean) {
    // Poisson probabilities up to the count where the tail is below 1e-16 of the mass; the
    // outcome sums the product over the grid (means here are a few goals at most).
    auto pmf = [](double mean) {
        std::vector<double> p{std::exp(-mean)};
        double tail = 1.0 - p.back();
        for (int k = 1; tail > 1e-16 && k < 200; ++k) {
            p.push_back(p.back() * mean / k);
            tail -= p.back();
        }
        return p;
    };
    const auto home = pmf(std::max(0.0, home_mean)), away = pmf(std::max(0.0, away_mean));
    scoring::Forecast f{0.0, 0.0, 0.0};
    const int lead = score[0] - score[1];
    for (std::size_t h = 0; h < home.size(); ++h) {
        for (std::size_t a = 0; a < away.size(); ++a) {
            const long diff = lead + static_cast<long>(h) - static_cast<long>(a);
            f[diff > 0 ? 0 : diff == 0 ? 1 : 2] += home[h] * away[a];
        }
    }
    const double sum = f[0] + f[1] + f[2];
    for (auto& p : f) p /= sum;
    return f;
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
    const core::Period period = m.header.clock.period;
    if (const auto* goal = std::get_if<core::Goal>(&m.body)) {
        timeline.marks.push_back({minute, TimelineMark::Kind::goal, goal->side, period});
    } else if (const auto* red = std::get_if<core::RedCard>(&m.body)) {
        timeline.marks.push_back({minute, TimelineMark::Kind::red_card, red->side, period});
    } else if (std::holds_alternative<core::GoalCancelled>(m.body)) {
        timeline.marks.push_back(
            {minute, TimelineMark::Kind::goal_cancelled, core::Side::home, period});
    }
}

}  // namespace

bool heard_recently(const core::MatchClock& last_message, const core::MatchClock& bucket) {
    return last_message.period == bucket.period && last_message.clock_ms <= bucket.clock_ms &&
           bucket.clock_ms - last_message.clock_ms <= kMaxSilenceMinutes * 60'000U;
}

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
                         const ForecasterParams& params, ReplayChoices choices) {
    MatchReplay out;
    if (messages.empty() || !std::holds_alternative<core::MatchSetup>(messages.front().body)) {
        out.problem = "no match setup before the feed";
        if (!messages.empty()) out.match_id = messages.front().header.match_id;
        return out;
    }
    out.match_id = messages.front().header.match_id;
    const auto& setup = std::get<core::MatchSetup>(messages.front().body);
    out.scheduled_kickoff_us = setup.scheduled_kickoff_us;
    out.home_name = setup.home_name;
    out.away_name = setup.away_name;
    std::optional<core::Match> model, baseline, independent;
    try {
        model.emplace(out.match_id, setup, params.model);
        baseline.emplace(out.match_id, setup, params.flat);
        independent.emplace(out.match_id, setup, params.independent);
    } catch (const std::exception& e) {
        out.problem = e.what();
        return out;
    }
    if (choices.keep_timeline)
        out.timeline = Timeline{setup.home_name,
                                setup.away_name,
                                {},
                                {},
                                setup.format.half_minutes,
                                setup.format.extra_half_minutes};

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
        slot[static_cast<std::size_t>(Forecaster::independent_poisson)] =
            forecast_of(independent->outputs());
        out.score_at_bucket[static_cast<std::size_t>(bucket)] = model->state().regulation_goals;
        if (choices.elo) {
            const auto& e = *choices.elo;
            const double share = e.remaining_share[static_cast<std::size_t>(bucket)];
            slot[static_cast<std::size_t>(Forecaster::elo_reference)] = independent_poisson_outcome(
                model->state().regulation_goals, e.home_goals * share, e.away_goals * share);
        }
    };
    // Kick-off: the pre-match forecast, which the fixed-prior baseline keeps for every bucket.
    record_bucket(0);
    const scoring::Forecast prior = forecast_of(model->outputs());
    if (out.timeline) out.timeline->points.push_back({0.0, prior, core::Period::pre_match});

    int next_bucket = 1;
    core::MatchClock last_heard{core::Period::pre_match, 0};  // the last message's clock
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
            if (!(independent->priced_clock() == at)) (void)independent->advance_to(at);
            if (!heard_recently(last_heard, at)) {  // the feed said nothing of this minute
                ++next_bucket;
                continue;
            }
            record_bucket(next_bucket++);
            if (out.timeline)
                out.timeline->points.push_back({minutes_of(model->priced_clock()),
                                                forecast_of(model->outputs()),
                                                model->priced_clock().period});
        }
        last_heard = m.header.clock;
        const auto verdict = model->apply(m).verdict;
        (void)baseline->apply(m);  // the same stream: its verdict is the model's
        (void)independent->apply(m);
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
                out.timeline->points.push_back({minutes_of(m.header.clock),
                                                forecast_of(model->outputs()),
                                                m.header.clock.period});
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
