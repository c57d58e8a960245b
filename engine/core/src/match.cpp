#include "liveprob/core/match.hpp"

#include <algorithm>
#include <cmath>
#include <optional>
#include <stdexcept>
#include <string>

#include "liveprob/core/clock_interpolant.hpp"
#include "liveprob/core/intensity.hpp"
#include "liveprob/core/timing.hpp"
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

Match::Match(Match&&) noexcept = default;
Match& Match::operator=(Match&&) noexcept = default;
Match::~Match() = default;

void Match::set_clock_interpolation(bool on) {
    if (!on) {
        interpolant_.reset();
    } else if (!interpolant_) {
        interpolant_ = std::make_unique<ClockInterpolant>();
    }
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
        const PricingInputs before = pricing_inputs();
        log_.push_back(LoggedMessage{message.header, std::move(event), RejectReason::none});
        const RejectReason outcome = fold_entry(log_.size() - 1);
        if (outcome != RejectReason::none) {
            count_rejection(outcome);
            return {Verdict::rejected, outcome};
        }
        counters_.accepted += 1;
        // A message that moved only the clock (a clock sync) keeps a window that is ready: its
        // solves priced the same state, and the exposure the message folded in is the stretch
        // up to its clock under that state (equal up to the rounding of one addition). A
        // window still filling starts again: its remaining nodes may lie before the new anchor.
        const bool clock_only = pricing_inputs() == before && interpolant_ && interpolant_->ready();
        anchor_clock(!clock_only);
        return {Verdict::accepted, RejectReason::none};
    }

    const auto offset = static_cast<std::size_t>(pos - log_.begin());
    log_.insert(pos, LoggedMessage{message.header, std::move(event), RejectReason::none});
    refold_from(offset);
    anchor_clock();
    const RejectReason outcome = log_[offset].outcome;
    if (outcome != RejectReason::none) {
        count_rejection(outcome);
        return {Verdict::rejected, outcome};
    }
    counters_.late += 1;
    return {Verdict::late, RejectReason::none};
}

RejectReason Match::fold_entry(std::size_t index) {
    LoggedMessage& entry = log_[index];
    entry.outcome = fold_.apply(state_, entry.message());
    if (entry.outcome == RejectReason::none) {
        state_.applied += 1;
    } else {
        state_.skipped += 1;
    }
    if (checkpoint_every_ == 0) return entry.outcome;
    const std::size_t folded = index + 1;
    const std::size_t last =
        valid_checkpoints_ == 0 ? 0 : checkpoints_[valid_checkpoints_ - 1].folded;
    // A checkpoint copies the goal and card records: spacing them at least four records' worth
    // of entries apart keeps the copies under 6 bytes a log entry even for a feed of nothing
    // but goals (a normal match holds a few records: the spacing is checkpoint_every_).
    const std::size_t records = state_.goals_log.size() + state_.cards_log.size();
    if (folded - last >= std::max(checkpoint_every_, 4 * records)) {
        // Slots past the valid ones are kept from earlier folds: copying into one reuses its
        // vectors' room, so a re-fold that passes it again allocates nothing.
        if (valid_checkpoints_ < checkpoints_.size()) {
            checkpoints_[valid_checkpoints_].folded = folded;
            checkpoints_[valid_checkpoints_].state = state_;
        } else {
            checkpoints_.push_back(Checkpoint{folded, state_});
        }
        valid_checkpoints_ += 1;
    }
    return entry.outcome;
}

void Match::refold_from(std::size_t changed) {
    // A checkpoint stays valid while none of the entries it folded changed.
    while (valid_checkpoints_ > 0 && checkpoints_[valid_checkpoints_ - 1].folded > changed) {
        valid_checkpoints_ -= 1;
    }
    std::size_t from = 0;
    if (valid_checkpoints_ == 0) {
        state_ = fold_.initial_state();
    } else {
        const Checkpoint& resume = checkpoints_[valid_checkpoints_ - 1];
        state_ = resume.state;  // a copy: the checkpoint stays
        from = resume.folded;
    }
    for (std::size_t i = from; i < log_.size(); ++i) (void)fold_entry(i);
}

void Match::set_refold_checkpoint_interval(std::size_t every) {
    checkpoint_every_ = every;
    checkpoints_.clear();
    checkpoints_.shrink_to_fit();
    valid_checkpoints_ = 0;
    // Folding the log again gives the very same state; it lays the new checkpoints.
    if (every != 0 && log_.size() >= every) refold_from(0);
}

std::size_t Match::refold_checkpoint_bytes() const noexcept {
    std::size_t bytes = checkpoints_.capacity() * sizeof(Checkpoint);
    for (const Checkpoint& c : checkpoints_) {
        bytes += c.state.goals_log.capacity() * sizeof(GoalRecord) +
                 c.state.cards_log.capacity() * sizeof(CardRecord);
    }
    return bytes;
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

PricingState Match::pricing_state_at(MatchClock clock) const {
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
        case MatchStatus::abandoned: ps.clock = clock; break;
    }
    if (in_play) {
        const auto& announced =
            state_.announced_stoppage[static_cast<std::size_t>(state_.period) - 1];
        if (announced) ps.announced_stoppage_minutes = static_cast<double>(*announced);
    }

    // Exposure so far: the fold's, plus the stretch the clock has run since the last message.
    std::array<double, 2> exposure = state_.exposure;
    if (in_play && !abandoned) {
        const auto added = fold_.exposure_until(state_, clock.clock_ms);
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

void Match::anchor_clock(bool pricing_moved) noexcept {
    priced_clock_ = state_.clock;  // every change of the fold re-anchors to the feed's clock
    outputs_stale_ = true;
    if (pricing_moved) fold_epoch_ += 1;
}

Match::PricingInputs Match::pricing_inputs() const noexcept {
    return {state_.status,
            state_.status_before_abandonment,
            state_.period,
            state_.period_running,
            state_.clock_running,
            state_.regulation_goals,
            state_.extra_time_goals,
            state_.reds,
            state_.announced_stoppage,
            state_.shootout,
            state_.xg,
            state_.xg_reported};
}

void Match::price_into(Outputs& out) const {
    if (interpolant_ && state_.status == MatchStatus::in_play) {
        price_drifting(out);
    } else {
        price_exact_at(priced_clock_, out);
    }
    out.status = state_.status;
    out.clock = priced_clock_;
    out.home_goals = static_cast<std::uint16_t>(state_.goals(Side::home));
    out.away_goals = static_cast<std::uint16_t>(state_.goals(Side::away));
    out.home_reds = static_cast<std::uint8_t>(std::min(state_.reds[0], 255));
    out.away_reds = static_cast<std::uint8_t>(std::min(state_.reds[1], 255));
    out.events_applied = state_.applied;
    out.shootout = state_.shootout;
}

void Match::price_exact_at(MatchClock clock, Outputs& out) const {
    model_.price(pricing_state_at(clock), out);
}

void Match::price_drifting(Outputs& out) const {
    ClockInterpolant& drift = *interpolant_;
    if (!drift.covers(fold_epoch_, priced_clock_)) {
        // A new window: from now to the next kink of the timing profile (or the period's end).
        const TimingCurve curve(fold_.params().timing, fold_.format());
        const PricingState ps = pricing_state_at(priced_clock_);
        const std::uint32_t end =
            std::min(curve.smooth_until_ms(priced_clock_, ps.announced_stoppage_minutes),
                     period_latest_ms(fold_.format(), priced_clock_.period));
        drift.begin(fold_epoch_, priced_clock_.period, priced_clock_.clock_ms, end);
    } else if (drift.ready()) {
        drift.evaluate(priced_clock_.clock_ms, out);
        return;
    }
    price_exact_at(priced_clock_, out);
    if (drift.wants_solve()) {  // one of the window's solves rides along with this call
        Outputs node;
        price_exact_at(drift.next_solve(), node);
        drift.record(node);
    }
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
