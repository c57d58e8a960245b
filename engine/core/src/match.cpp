#include "liveprob/core/match.hpp"

#include <algorithm>
#include <cmath>
#include <optional>
#include <stdexcept>
#include <string>

#include "liveprob/core/intensity.hpp"
#include "liveprob/core/validate.hpp"

namespace liveprob::core {

namespace {

constexpr std::size_t kReservedLog = 16;  // grows (geometrically) past the first messages

const PriorMeans& checked_prior(const MatchSetup& setup) {
    if (!setup.prior) {
        throw std::invalid_argument(
            "match setup has no expected goals (resolve ratings to a prior first)");
    }
    if (const auto problem = validate_prior(*setup.prior))
        throw std::invalid_argument("match setup " + problem->describe());
    return *setup.prior;
}

const CompetitionFormat& checked_format(const MatchSetup& setup) {
    if (const auto problem = validate_format(setup.format))
        throw std::invalid_argument("match setup " + problem->describe());
    return setup.format;
}

}  // namespace

const char* verdict_name(Verdict verdict) noexcept {
    switch (verdict) {
        case Verdict::accepted: return "accepted";
        case Verdict::late: return "late";
        case Verdict::duplicate: return "duplicate";
        case Verdict::rejected: return "rejected";
    }
    return "unknown";
}

Match::Match(std::uint64_t match_id, const MatchSetup& setup, const ModelParams& params)
    : setup_(setup), fold_(match_id, checked_format(setup), checked_prior(setup), params),
      model_(params), state_(fold_.initial_state()) {
    log_.reserve(kReservedLog);
    anchor_clock();
}

void Match::count_rejection(RejectReason reason) noexcept {
    counters_.rejected += 1;
    counters_.rejected_by_reason[static_cast<std::size_t>(reason)] += 1;
}

ApplyResult Match::apply(const InboundMessage& message) {
    if (const RejectReason why = fold_.screen(message); why != RejectReason::none) {
        count_rejection(why);
        return {Verdict::rejected, why};
    }
    const std::uint64_t seq = message.header.source_seq;
    const auto pos = std::lower_bound(
        log_.begin(), log_.end(), seq,
        [](const LoggedMessage& entry, std::uint64_t s) { return entry.header.source_seq < s; });
    if (pos != log_.end() && pos->header.source_seq == seq) {
        counters_.duplicates += 1;
        if (!(pos->message() == message)) counters_.conflicting_duplicates += 1;
        return {Verdict::duplicate, RejectReason::none};
    }
    EventBody event = *event_of(message.body);  // screen() refused setups

    if (pos == log_.end()) {  // the usual case: newest in feed order, folded in place
        const RejectReason outcome = fold_.apply(state_, message);
        log_.push_back(LoggedMessage{message.header, std::move(event), outcome});
        if (outcome != RejectReason::none) {
            state_.skipped += 1;
            count_rejection(outcome);
            return {Verdict::rejected, outcome};
        }
        state_.applied += 1;
        counters_.accepted += 1;
        anchor_clock();
        return {Verdict::accepted, RejectReason::none};
    }

    const auto offset = pos - log_.begin();
    log_.insert(pos, LoggedMessage{message.header, std::move(event), RejectReason::none});
    refold();
    const RejectReason outcome = log_[static_cast<std::size_t>(offset)].outcome;
    if (outcome != RejectReason::none) {
        count_rejection(outcome);
        return {Verdict::rejected, outcome};
    }
    counters_.late += 1;
    return {Verdict::late, RejectReason::none};
}

void Match::refold() {
    state_ = fold_.initial_state();
    for (auto& entry : log_) {
        entry.outcome = fold_.apply(state_, entry.message());
        if (entry.outcome == RejectReason::none) {
            state_.applied += 1;
        } else {
            state_.skipped += 1;
        }
    }
    anchor_clock();
}

bool Match::advance_to(MatchClock now) {
    if (state_.status != MatchStatus::in_play || !state_.clock_running ||
        now.period != state_.period || now.clock_ms < state_.clock.clock_ms) {
        return false;
    }
    now.clock_ms = std::min(now.clock_ms, period_latest_ms(fold_.format(), now.period));
    // A clock held at the period's latest point (play beyond the announced stoppage time) does
    // not move on: the outputs already priced there stay valid, and the timer's republish of
    // such a match costs no pricing.
    if (!(now == priced_clock_)) {
        priced_clock_ = now;
        outputs_stale_ = true;
    }
    return true;
}

PricingState Match::pricing_state() const {
    PricingState ps;
    ps.format = fold_.format();
    ps.prior = fold_.prior();
    const bool abandoned = state_.status == MatchStatus::abandoned;
    ps.status = abandoned ? state_.status_before_abandonment : state_.status;
    const bool in_play = ps.status == MatchStatus::in_play;
    if (ps.status == MatchStatus::interval && may_end_after(state_, fold_.format())) {
        ps.status = MatchStatus::finished;  // nothing is left to play: the score is the result
    }
    switch (ps.status) {
        case MatchStatus::not_started: ps.clock = MatchClock{Period::first_half, 0}; break;
        case MatchStatus::interval: {
            const Period next = next_period(fold_.format(), state_.period);
            ps.clock = MatchClock{next, period_start_ms(fold_.format(), next)};
            break;
        }
        case MatchStatus::in_play:
        case MatchStatus::shootout:
        case MatchStatus::finished:
        case MatchStatus::abandoned: ps.clock = priced_clock_; break;
    }
    if (in_play) {
        const auto& announced =
            state_.announced_stoppage[static_cast<std::size_t>(state_.period) - 1];
        if (announced) ps.announced_stoppage_minutes = static_cast<double>(*announced);
    }

    // Exposure so far: the fold's, plus the stretch the clock has run since the last message.
    std::array<double, 2> exposure = state_.exposure;
    if (in_play && !abandoned) {
        const auto added = fold_.exposure_until(state_, priced_clock_.clock_ms);
        exposure[0] += added[0];
        exposure[1] += added[1];
    }
    for (Side s : {Side::home, Side::away}) {
        const auto i = static_cast<std::size_t>(index(s));
        ps.goals[i] = state_.goals(s);
        ps.reds[i] = state_.reds[i];
        // xG counts as evidence only once the feed reports it (see engine/README.md).
        const std::optional<double> xg =
            state_.xg_reported ? std::optional<double>(state_.xg[i]) : std::nullopt;
        const StrengthPosterior post =
            strength_posterior(fold_.params(), ps.goals[i], exposure[i], xg);
        ps.theta_shape[i] = post.shape;
        ps.theta_rate[i] = post.rate;
    }
    ps.shootout.taken = state_.shootout.taken;
    ps.shootout.scored = state_.shootout.scored;
    ps.shootout.first = state_.shootout.first;
    return ps;
}

void Match::anchor_clock() noexcept {
    priced_clock_ = state_.clock;  // every change of the fold re-anchors to the feed's clock
    outputs_stale_ = true;
}

void Match::price_into(Outputs& out) const {
    const PricingState ps = pricing_state();
    model_.price(ps, out);
    out.status = state_.status;
    out.clock = priced_clock_;
    out.home_goals = static_cast<std::uint16_t>(ps.goals[0]);
    out.away_goals = static_cast<std::uint16_t>(ps.goals[1]);
    out.home_reds = static_cast<std::uint8_t>(std::min(ps.reds[0], 255));
    out.away_reds = static_cast<std::uint8_t>(std::min(ps.reds[1], 255));
    out.events_applied = state_.applied;
}

const Outputs& Match::outputs() const {
    if (!outputs_) outputs_ = std::make_unique<Outputs>();
    if (outputs_stale_) {
        price_into(*outputs_);
        outputs_stale_ = false;
    }
    return *outputs_;
}

}  // namespace liveprob::core
