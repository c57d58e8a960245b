#include "liveprob/core/state_fold.hpp"

#include <cmath>
#include <variant>
#include <vector>

#include "liveprob/core/intensity.hpp"

namespace liveprob::core {

namespace {

constexpr std::size_t at(Side s) noexcept { return static_cast<std::size_t>(index(s)); }
constexpr bool valid_side(Side s) noexcept { return s == Side::home || s == Side::away; }
constexpr bool valid_period(Period p) noexcept { return p <= Period::finished; }
constexpr int kMaxAnnouncedStoppage = 30;  // minutes; common practice: no board shows more
constexpr int kMaxCorrectedGoals = 99;
constexpr std::size_t kReservedRecords = 8;

// The record a correction names by its source sequence number, if the log holds it.
template <class Record>
Record* find_record(std::vector<Record>& records, std::uint64_t seq) noexcept {
    for (auto& r : records) {
        if (r.seq == seq) return &r;
    }
    return nullptr;
}

}  // namespace

// The per-kind handlers. Each checks first and mutates only once every check has passed.
struct StateFold::Step {
    const StateFold& fold;
    MatchState& state;
    const MessageHeader& header;

    // An in-period message's clock must name the period being played and lie within it.
    RejectReason check_clock() const noexcept {
        if (header.clock.period > state.period) return RejectReason::period_not_started;
        if (header.clock.period < state.period) return RejectReason::period_already_over;
        if (!state.period_running) return RejectReason::period_already_over;
        if (state.period == Period::shootout) return RejectReason::none;
        const std::uint32_t ms = header.clock.clock_ms;
        if (ms < period_start_ms(fold.format_, state.period) ||
            ms > period_latest_ms(fold.format_, state.period)) {
            return RejectReason::clock_outside_period;
        }
        return RejectReason::none;
    }

    // For events of open play (goals, shots): the match must be in a period of play.
    RejectReason check_open_play() const noexcept {
        if (state.status == MatchStatus::not_started) return RejectReason::before_kickoff;
        return check_clock();
    }

    bool clock_usable() const noexcept {
        return state.status == MatchStatus::in_play && check_clock() == RejectReason::none;
    }

    // Moves the clock to the header's and adds the exposure of that stretch under the state
    // before this message (messages that may come with any clock only move it when usable).
    void advance_clock() noexcept {
        if (!clock_usable()) return;
        const auto added = fold.exposure_until(state, header.clock.clock_ms);
        state.exposure[0] += added[0];
        state.exposure[1] += added[1];
        if (header.clock.clock_ms > state.clock.clock_ms)
            state.clock.clock_ms = header.clock.clock_ms;
    }

    bool extra_time_phase() const noexcept {
        return is_extra_time(state.period) ||
               (state.period == Period::shootout && fold.format_.extra_time);
    }

    // The final whistle may come once regulation's nominal time is played and the tie, if
    // it needs a winner, has one (or the format has no way left to find one).
    bool may_end() const noexcept {
        if (state.period == Period::second_half && state.period_running &&
            header.clock.clock_ms < period_nominal_end_ms(fold.format_, Period::second_half)) {
            return false;
        }
        return may_end_after(state, fold.format_);
    }

    RejectReason operator()(const MatchSetup&) noexcept { return RejectReason::setup_in_stream; }

    RejectReason operator()(const PeriodStart& m) noexcept {
        if (state.period_running || m.period != next_period(fold.format_, state.period) ||
            m.period == Period::finished) {
            return RejectReason::period_out_of_order;
        }
        std::uint32_t start = period_start_ms(fold.format_, m.period);
        if (header.clock.period == m.period && m.period != Period::shootout) {
            if (header.clock.clock_ms > period_latest_ms(fold.format_, m.period)) {
                return RejectReason::clock_outside_period;
            }
            if (header.clock.clock_ms > start) start = header.clock.clock_ms;
        }
        state.period = m.period;
        state.period_running = true;
        state.status = m.period == Period::shootout ? MatchStatus::shootout : MatchStatus::in_play;
        state.clock = MatchClock{m.period, start};
        state.clock_running = true;
        return RejectReason::none;
    }

    RejectReason operator()(const PeriodEnd& m) noexcept {
        if (state.status == MatchStatus::not_started) return RejectReason::before_kickoff;
        if (!state.period_running || m.period != state.period)
            return RejectReason::period_out_of_order;
        if (m.period == Period::shootout) {
            if (!shootout_decided(state.shootout)) return RejectReason::period_out_of_order;
        } else if (const auto why = check_clock(); why != RejectReason::none) {
            return why;
        }
        advance_clock();
        state.period_running = false;
        state.status = MatchStatus::interval;
        return RejectReason::none;
    }

    RejectReason operator()(const Goal& m) {  // may grow the goal records
        if (state.status == MatchStatus::shootout) return RejectReason::goal_in_shootout;
        if (const auto why = check_open_play(); why != RejectReason::none) return why;
        advance_clock();
        const bool extra = is_extra_time(state.period);
        (extra ? state.extra_time_goals : state.regulation_goals)[at(m.side)] += 1;
        state.goals_log.push_back(GoalRecord{header.source_seq, m.side, extra, false});
        return RejectReason::none;
    }

    RejectReason operator()(const GoalCancelled& m) noexcept {
        if (state.status == MatchStatus::not_started) return RejectReason::before_kickoff;
        GoalRecord* goal = find_record(state.goals_log, m.goal_seq);
        if (!goal) return RejectReason::unknown_goal;
        if (goal->cancelled) return RejectReason::goal_already_cancelled;
        auto& count =
            (goal->extra_time ? state.extra_time_goals : state.regulation_goals)[at(goal->side)];
        if (count <= 0) return RejectReason::score_below_zero;
        // The exposure already counted stays: until the review the match was played in the
        // state with the goal on the board.
        advance_clock();
        count -= 1;
        goal->cancelled = true;
        return RejectReason::none;
    }

    RejectReason operator()(const RedCard& m) {  // may grow the card records
        if (state.status == MatchStatus::not_started) return RejectReason::before_kickoff;
        if (state.status == MatchStatus::in_play) {
            if (const auto why = check_clock(); why != RejectReason::none) return why;
        }
        advance_clock();
        state.reds[at(m.side)] += 1;
        state.cards_log.push_back(CardRecord{header.source_seq, m.side, false});
        return RejectReason::none;
    }

    RejectReason operator()(const CardRescinded& m) noexcept {
        if (state.status == MatchStatus::not_started) return RejectReason::before_kickoff;
        CardRecord* card = find_record(state.cards_log, m.card_seq);
        if (!card) return RejectReason::unknown_card;
        if (card->rescinded) return RejectReason::card_already_rescinded;
        advance_clock();
        state.reds[at(card->side)] -= 1;
        card->rescinded = true;
        return RejectReason::none;
    }

    RejectReason operator()(const StoppageAnnounced& m) noexcept {
        if (state.status == MatchStatus::not_started) return RejectReason::before_kickoff;
        if (m.period > state.period) return RejectReason::period_not_started;
        if (m.period < state.period || !state.period_running)
            return RejectReason::period_already_over;
        advance_clock();
        state.announced_stoppage[static_cast<std::size_t>(m.period) - 1] = m.minutes;
        return RejectReason::none;
    }

    RejectReason operator()(const ScoreCorrection& m) noexcept {
        if (state.status == MatchStatus::not_started) return RejectReason::before_kickoff;
        std::array<int, 2> regulation = state.regulation_goals;
        std::array<int, 2> extra = state.extra_time_goals;
        const std::array<int, 2> target{m.home_goals, m.away_goals};
        for (std::size_t s = 0; s < 2; ++s) {
            if (extra_time_phase()) {
                extra[s] = target[s] - regulation[s];
                if (extra[s] < 0) return RejectReason::score_below_zero;
            } else {
                regulation[s] = target[s];
            }
        }
        advance_clock();
        state.regulation_goals = regulation;
        state.extra_time_goals = extra;
        return RejectReason::none;
    }

    RejectReason operator()(const ShootoutKick& m) noexcept {
        if (state.status != MatchStatus::shootout) return RejectReason::kick_outside_shootout;
        if (shootout_decided(state.shootout)) return RejectReason::shootout_already_decided;
        auto& tally = state.shootout;
        const bool first_kick = tally.taken[0] + tally.taken[1] == 0;
        if (!first_kick && m.side != shootout_next_kicker(tally))
            return RejectReason::kick_out_of_turn;
        if (first_kick) tally.first = m.side;
        const int kick = tally.taken[at(m.side)];
        tally.taken[at(m.side)] += 1;
        if (m.scored) {
            tally.scored[at(m.side)] += 1;
            if (kick < kShootoutKicksRecorded)
                tally.scored_bits[at(m.side)] |= std::uint64_t{1} << kick;
        }
        return RejectReason::none;
    }

    RejectReason operator()(const ShotXg& m) noexcept {
        if (state.status == MatchStatus::shootout) return RejectReason::period_not_running;
        if (const auto why = check_open_play(); why != RejectReason::none) return why;
        advance_clock();
        state.xg[at(m.side)] += m.xg;
        state.xg_reported = true;
        return RejectReason::none;
    }

    RejectReason operator()(const MatchAbandoned&) noexcept {
        // Nothing else changes: the outputs stay priced at the last state (see match.hpp).
        state.status_before_abandonment = state.status;
        state.status = MatchStatus::abandoned;
        return RejectReason::none;
    }

    RejectReason operator()(const FinalWhistle&) noexcept {
        if (state.status == MatchStatus::not_started) return RejectReason::before_kickoff;
        if (state.period_running && is_playing_period(state.period)) {
            if (const auto why = check_clock(); why != RejectReason::none) return why;
        }
        if (!may_end()) return RejectReason::final_whistle_too_early;
        advance_clock();
        state.period_running = false;
        state.status = MatchStatus::finished;
        return RejectReason::none;
    }

    RejectReason operator()(const ClockSync& m) noexcept {
        if (state.status == MatchStatus::in_play) {
            if (const auto why = check_clock(); why != RejectReason::none) return why;
        }
        advance_clock();
        state.clock_running = m.running;
        return RejectReason::none;
    }
};

StateFold::StateFold(std::uint64_t match_id, const CompetitionFormat& format,
                     const PriorMeans& prior, const ModelParams& params)
    : match_id_(match_id), format_(format), prior_(prior), params_(params),
      curve_(params.timing, format) {}

MatchState StateFold::initial_state() const {
    MatchState state;
    state.goals_log.reserve(kReservedRecords);
    state.cards_log.reserve(kReservedRecords);
    return state;
}

RejectReason StateFold::screen(const InboundMessage& message) const noexcept {
    if (message.header.match_id != match_id_) return RejectReason::other_match;
    if (!valid_period(message.header.clock.period)) return RejectReason::unknown_period;
    return std::visit(
        [](const auto& body) noexcept -> RejectReason {
            using T = std::decay_t<decltype(body)>;
            if constexpr (std::is_same_v<T, MatchSetup>) {
                return RejectReason::setup_in_stream;
            } else if constexpr (std::is_same_v<T, Goal> || std::is_same_v<T, RedCard> ||
                                 std::is_same_v<T, ShootoutKick>) {
                return valid_side(body.side) ? RejectReason::none : RejectReason::unknown_side;
            } else if constexpr (std::is_same_v<T, ShotXg>) {
                if (!valid_side(body.side)) return RejectReason::unknown_side;
                // xG of one shot is a probability of scoring.
                const bool ok = std::isfinite(body.xg) && body.xg >= 0.0 && body.xg <= 1.0;
                return ok ? RejectReason::none : RejectReason::bad_xg;
            } else if constexpr (std::is_same_v<T, PeriodStart> || std::is_same_v<T, PeriodEnd>) {
                const bool ok =
                    body.period >= Period::first_half && body.period <= Period::shootout;
                return ok ? RejectReason::none : RejectReason::unknown_period;
            } else if constexpr (std::is_same_v<T, StoppageAnnounced>) {
                if (!is_playing_period(body.period)) return RejectReason::unknown_period;
                return body.minutes > kMaxAnnouncedStoppage ? RejectReason::implausible_stoppage
                                                            : RejectReason::none;
            } else if constexpr (std::is_same_v<T, ScoreCorrection>) {
                const bool ok =
                    body.home_goals <= kMaxCorrectedGoals && body.away_goals <= kMaxCorrectedGoals;
                return ok ? RejectReason::none : RejectReason::implausible_score;
            } else {
                return RejectReason::none;
            }
        },
        message.body);
}

RejectReason StateFold::apply(MatchState& state, const InboundMessage& message) const {
    if (state.status == MatchStatus::finished) return RejectReason::after_final_whistle;
    if (state.status == MatchStatus::abandoned) return RejectReason::after_abandonment;
    Step step{*this, state, message.header};
    return std::visit(step, message.body);
}

std::array<double, 2> StateFold::exposure_until(const MatchState& state,
                                                std::uint32_t to_ms) const {
    std::array<double, 2> added{};
    if (state.status != MatchStatus::in_play || to_ms <= state.clock.clock_ms) return added;
    const double stretch = curve_.period_exposure(state.period, state.clock.clock_ms, to_ms);
    const int diff_home = aggregate_difference(state, format_);
    const double lambda[2] = {prior_.home_goals, prior_.away_goals};
    for (Side s : {Side::home, Side::away}) {
        const int diff = s == Side::home ? diff_home : -diff_home;
        const double m =
            state_multiplier(params_, s, diff, state.reds[at(s)], state.reds[at(other(s))]);
        added[at(s)] = lambda[at(s)] * m * stretch;
    }
    return added;
}

}  // namespace liveprob::core
