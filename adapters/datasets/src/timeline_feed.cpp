#include "liveprob/datasets/timeline_feed.hpp"

#include <algorithm>

#include "liveprob/core/match_state.hpp"

namespace liveprob::datasets {
namespace {

constexpr std::int64_t kMinuteUs = 60'000'000;
constexpr std::uint32_t kMinuteMs = 60'000;
constexpr int kDefaultKickoffMinute = 15 * 60;  // 15:00 UTC when the source gives no time
constexpr int kMaxKicksPerSide = 30;

std::uint32_t usual_stoppage_minutes(core::Period p) {
    switch (p) {
        case core::Period::first_half: return 2;
        case core::Period::second_half: return 4;
        default: return 1;
    }
}

// Wall-clock breaks before a period starts (the source gives none): half-time, a pause before
// extra time, none between its halves, a pause before the shoot-out.
std::int64_t break_minutes_before(core::Period p) {
    switch (p) {
        case core::Period::first_half:
            return 30;  // the setup goes out half an hour before kick-off
        case core::Period::second_half: return 15;
        case core::Period::extra_first:
        case core::Period::shootout: return 5;
        default: return 0;
    }
}

core::Period period_of(const TimelineGoal& g) {
    if (g.minute <= 45) return core::Period::first_half;
    if (g.minute <= 90) return core::Period::second_half;
    if (g.minute <= 105) return core::Period::extra_first;
    return core::Period::extra_second;
}

std::uint32_t goal_clock_ms(const TimelineGoal& g) {
    return static_cast<std::uint32_t>(g.minute + g.stoppage - 1) * kMinuteMs + kMinuteMs / 2;
}

// Numbers the messages and stamps their source time: within a period, its wall-clock start
// plus the clock run since the period's start; a period starts after the previous one's last
// message and its break.
class FeedWriter {
public:
    FeedWriter(std::uint64_t match_id, std::int64_t kickoff_us)
        : match_id_(match_id), period_wall_us_(kickoff_us) {}

    void start_period(core::Period period, std::uint32_t start_ms) {
        period_wall_us_ = last_wall_us_ + break_minutes_before(period) * kMinuteUs;
        period_start_ms_ = start_ms;
    }
    // `after_us`: wall time beyond the clock (shoot-out kicks, whose clock stands still).
    void emit(core::MessageBody body, core::MatchClock clock, std::int64_t after_us = 0) {
        core::InboundMessage m;
        m.header.match_id = match_id_;
        m.header.source_seq = messages_.size() + 1;
        m.header.clock = clock;
        const std::int64_t run_ms =
            clock.clock_ms >= period_start_ms_ ? clock.clock_ms - period_start_ms_ : 0;
        m.header.source_time_us = period_wall_us_ + run_ms * 1000 + after_us;
        last_wall_us_ = std::max(last_wall_us_, m.header.source_time_us);
        m.body = std::move(body);
        messages_.push_back(std::move(m));
    }
    std::vector<core::InboundMessage> take() { return std::move(messages_); }

private:
    std::uint64_t match_id_;
    std::int64_t period_wall_us_;
    std::int64_t last_wall_us_ = 0;
    std::uint32_t period_start_ms_ = 0;
    std::vector<core::InboundMessage> messages_;
};

// One half of a match whose goal minutes are unknown (only the half-time and full-time scores):
// its start, the first half's goals at 44:30 and a clock reading at 45:00 (the score is known
// at the interval), the second half's goals at 92:30 (in stoppage: after every bucket minute),
// its end. Nothing else: no clock reading tells the model about a minute it knows nothing of,
// so only the kick-off and 45' buckets are read from such a feed (match_replay.hpp).
void write_half_scores_only(FeedWriter& out, const core::CompetitionFormat& format,
                            core::Period period, const std::vector<TimelineGoal>& goals) {
    const std::uint32_t start = period_start_ms(format, period);
    const std::uint32_t nominal_end = period_nominal_end_ms(format, period);
    const std::uint32_t goal_ms = period == core::Period::first_half
                                      ? nominal_end - kMinuteMs / 2
                                      : nominal_end + 2 * kMinuteMs + kMinuteMs / 2;
    out.start_period(period, start);
    out.emit(core::PeriodStart{period}, {period, start});
    for (const TimelineGoal& g : goals)
        if (period_of(g) == period) out.emit(core::Goal{g.side, false, false}, {period, goal_ms});
    if (period == core::Period::first_half) out.emit(core::ClockSync{true}, {period, nominal_end});
    out.emit(core::PeriodEnd{period},
             {period, std::max(nominal_end + usual_stoppage_minutes(period) * kMinuteMs,
                               goal_ms + kMinuteMs / 2)});
}

// One period: its start, clock readings every five minutes and goals in time order, its end.
void write_period(FeedWriter& out, const core::CompetitionFormat& format, core::Period period,
                  const std::vector<TimelineGoal>& goals) {
    const std::uint32_t start = period_start_ms(format, period);
    const std::uint32_t nominal_end = period_nominal_end_ms(format, period);
    std::uint32_t end = nominal_end + usual_stoppage_minutes(period) * kMinuteMs;
    out.start_period(period, start);
    out.emit(core::PeriodStart{period}, {period, start});
    auto goal = std::find_if(goals.begin(), goals.end(),
                             [&](const TimelineGoal& g) { return period_of(g) == period; });
    auto next_goal = [&] {
        return std::find_if(std::next(goal), goals.end(),
                            [&](const TimelineGoal& g) { return period_of(g) == period; });
    };
    const std::uint32_t step = kTimelineClockSyncMinutes * kMinuteMs;
    for (std::uint32_t sync = start + step; sync <= nominal_end; sync += step) {
        for (; goal != goals.end() && goal_clock_ms(*goal) < sync; goal = next_goal()) {
            out.emit(core::Goal{goal->side, goal->penalty, goal->own_goal},
                     {period, goal_clock_ms(*goal)});
        }
        out.emit(core::ClockSync{true}, {period, sync});
    }
    for (; goal != goals.end(); goal = next_goal()) {
        out.emit(core::Goal{goal->side, goal->penalty, goal->own_goal},
                 {period, goal_clock_ms(*goal)});
        end = std::max(end, goal_clock_ms(*goal) + kMinuteMs / 2);
    }
    out.emit(core::PeriodEnd{period}, {period, end});
}

bool search_kicks(core::ShootoutTally& tally, const std::array<int, 2>& target, core::Side first,
                  std::vector<core::ShootoutKick>& kicks) {
    if (shootout_decided(tally)) return tally.scored == target;
    const core::Side kicker =
        tally.taken[0] + tally.taken[1] == 0 ? first : shootout_next_kicker(tally);
    const auto k = static_cast<std::size_t>(index(kicker));
    if (tally.taken[k] >= kMaxKicksPerSide) return false;
    for (const bool scored : {true, false}) {
        if (scored && tally.scored[k] >= target[k]) continue;
        const core::ShootoutTally before = tally;
        if (kicks.empty()) tally.first = kicker;
        tally.taken[k] += 1;
        tally.scored[k] += scored ? 1 : 0;
        kicks.push_back(core::ShootoutKick{kicker, scored});
        if (search_kicks(tally, target, first, kicks)) return true;
        kicks.pop_back();
        tally = before;
    }
    return false;
}

}  // namespace

std::vector<core::ShootoutKick> reconstructed_kicks(const TimelineShootout& shootout) {
    std::array<int, 2> winner_only{};
    winner_only[static_cast<std::size_t>(index(shootout.winner))] = 5;
    winner_only[static_cast<std::size_t>(index(other(shootout.winner)))] = 4;
    // The named first kicker, else home first, then away first (some scores are reachable
    // from one side only: 3-5 needs the away side to kick first).
    std::vector<core::Side> firsts{shootout.first_kicker.value_or(core::Side::home)};
    if (!shootout.first_kicker) firsts.push_back(core::Side::away);
    for (const auto& target : {shootout.tally.value_or(winner_only), winner_only}) {
        for (const core::Side first : firsts) {
            core::ShootoutTally tally;
            std::vector<core::ShootoutKick> kicks;
            if (search_kicks(tally, target, first, kicks)) return kicks;
        }
    }
    return {};  // not reached: 5-4 is reachable from either first kicker
}

std::vector<core::InboundMessage> feed_from_timeline(const MatchTimeline& match,
                                                     std::uint64_t match_id,
                                                     const core::PriorMeans& prior) {
    core::MatchSetup setup;
    setup.home_name = match.home;
    setup.away_name = match.away;
    setup.neutral_venue = match.neutral;
    setup.prior = prior;
    setup.format.extra_time = match.extra_time;
    // A knock-out tie: a shoot-out if level after extra time, unless it was level and none is
    // recorded (before shoot-outs such a tie was replayed another day).
    const bool level = match.regulation_goals[0] + match.extra_time_goals[0] ==
                       match.regulation_goals[1] + match.extra_time_goals[1];
    setup.format.shootout = match.extra_time && (match.shootout.has_value() || !level);
    const std::int64_t kickoff_us = (static_cast<std::int64_t>(match.day) * 24 * 60 +
                                     match.kickoff_minute.value_or(kDefaultKickoffMinute)) *
                                    kMinuteUs;
    setup.scheduled_kickoff_us = kickoff_us;

    FeedWriter out(match_id, kickoff_us - 30 * kMinuteUs);
    out.emit(setup, {core::Period::pre_match, 0});
    for (const core::Period p : {core::Period::first_half, core::Period::second_half}) {
        if (match.goal_minutes_known) write_period(out, setup.format, p, match.goals);
        else write_half_scores_only(out, setup.format, p, match.goals);
    }
    if (match.extra_time) {
        for (const core::Period p : {core::Period::extra_first, core::Period::extra_second})
            write_period(out, setup.format, p, match.goals);
    }
    if (match.shootout) {
        const core::MatchClock clock{core::Period::shootout,
                                     period_start_ms(setup.format, core::Period::shootout)};
        out.start_period(core::Period::shootout, clock.clock_ms);
        out.emit(core::PeriodStart{core::Period::shootout}, clock);
        std::int64_t kick_us = 0;
        for (const core::ShootoutKick& kick : reconstructed_kicks(*match.shootout)) {
            kick_us += kMinuteUs;
            out.emit(kick, clock, kick_us);
        }
        out.emit(core::PeriodEnd{core::Period::shootout}, clock, kick_us);
    }
    auto messages = out.take();
    const core::InboundMessage& previous = messages.back();
    core::InboundMessage whistle{previous.header, core::FinalWhistle{}};
    whistle.header.source_seq += 1;
    messages.push_back(std::move(whistle));
    return messages;
}

}  // namespace liveprob::datasets
