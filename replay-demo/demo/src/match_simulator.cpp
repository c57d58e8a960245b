#include "liveprob/demo/match_simulator.hpp"

#include <algorithm>
#include <cmath>
#include <optional>
#include <string>

#include "liveprob/core/match_state.hpp"
#include "liveprob/demo/portable_random.hpp"

namespace liveprob::demo {

namespace {

// The simulator's own constants (invented for the demo; they only need to be plausible).
constexpr double kBaseGoalsPerMinute = 0.95 / 100.0;
constexpr double kStep = 0.1;            // minutes per simulation step (6 seconds)
constexpr long kStepsPerClockSync = 50;  // the feed confirms its clock every 5 minutes
constexpr double kFatigue = 0.35;        // rate x (1 + kFatigue * (t/90)^2)
constexpr double kMomentum = 0.40;       // scorer's rate x (1 + kMomentum e^{-dt/8})
constexpr double kMomentumMinutes = 8.0;
constexpr double kChaseFrom = 60.0;  // trailing side pushes from this minute
constexpr double kChase = 1.30, kProtect = 0.85;
constexpr double kRedPerMinute = 0.0011;
constexpr double kOwnRed = 0.72, kOpponentRed = 1.22;
constexpr double kShotsPerGoal = 4.0;
constexpr double kPenaltyShare = 0.11, kOwnGoalShare = 0.04, kReviewCancelShare = 0.05;
constexpr double kRescindShare = 0.05, kInjuryStopPerMatch = 0.3;
constexpr double kCorrectionShare = 0.03, kAbandonShare = 0.006;
constexpr double kExtraTimeRate = 0.90;
constexpr std::int64_t kHalfTimeUs = 15LL * 60 * 1'000'000;

std::uint32_t to_ms(double minutes) {
    return static_cast<std::uint32_t>(std::llround(minutes * 60'000.0));
}
std::size_t at(core::Side s) { return static_cast<std::size_t>(index(s)); }

class MatchPlay {
public:
    explicit MatchPlay(const MatchPlan& plan) : plan_(plan), rng_(plan.seed) {
        // This match's home edge: the club's own, varied by the day (none at a neutral venue).
        home_edge_ = plan.neutral_venue ? 0.0 : plan.home->home_edge + rng_.normal(0.0, 0.10);
        abandon_at_ = rng_.chance(kAbandonShare) ? rng_.uniform(5.0, 85.0) : -1.0;
        injury_stop_at_ = rng_.chance(kInjuryStopPerMatch) ? rng_.uniform(10.0, 80.0) : -1.0;
        correction_at_ = rng_.chance(kCorrectionShare) ? rng_.uniform(30.0, 88.0) : -1.0;
    }

    SimulatedMatch play() {
        core::MatchSetup setup;
        setup.home_name = plan_.home->name;
        setup.away_name = plan_.away->name;
        setup.neutral_venue = plan_.neutral_venue;
        setup.prior = published_prior(plan_);
        setup.format = plan_.format;
        setup.scheduled_kickoff_us = plan_.kickoff_us;
        setup.competition = plan_.competition;
        emit(setup, {core::Period::pre_match, 0});

        const double half = plan_.format.half_minutes;
        if (play_period(core::Period::first_half, 0.0, half) &&
            play_period(core::Period::second_half, half, half)) {
            if (plan_.format.needs_winner() && level()) {
                const double extra = plan_.format.extra_half_minutes;
                if (plan_.format.extra_time) {
                    play_period(core::Period::extra_first, 2 * half, extra);
                    play_period(core::Period::extra_second, 2 * half + extra, extra);
                }
                if (level() && plan_.format.shootout) play_shootout();
            }
            emit(core::FinalWhistle{}, last_clock_);
            result_.winner = winner();
        }
        return std::move(result_);
    }

private:
    bool level() const { return total(core::Side::home) == total(core::Side::away); }
    int total(core::Side s) const {
        return result_.regulation_goals[at(s)] + result_.extra_time_goals[at(s)];
    }
    core::Side winner() const {
        if (total(core::Side::home) != total(core::Side::away))
            return total(core::Side::home) > total(core::Side::away) ? core::Side::home
                                                                     : core::Side::away;
        return result_.shootout_goals[0] >= result_.shootout_goals[1] ? core::Side::home
                                                                      : core::Side::away;
    }

    template <class Body>
    std::uint64_t emit(Body body, core::MatchClock clock) {
        core::InboundMessage m;
        m.header.match_id = plan_.match_id;
        m.header.source_seq = ++seq_;
        m.header.source_time_us =
            plan_.kickoff_us + wall_offset_us_ + static_cast<std::int64_t>(clock.clock_ms) * 1000;
        m.header.clock = clock;
        m.body = std::move(body);
        result_.messages.push_back(std::move(m));
        last_clock_ = clock;
        return seq_;
    }

    // Goal rate per minute of `side` at minute t of the running clock.
    double rate(core::Side side, double t, bool extra_time) const {
        const DemoClub& own = side == core::Side::home ? *plan_.home : *plan_.away;
        const DemoClub& opponent = side == core::Side::home ? *plan_.away : *plan_.home;
        double r = kBaseGoalsPerMinute * std::exp(own.attack - opponent.defence +
                                                  (side == core::Side::home ? home_edge_ : 0.0));
        const double played = std::min(t, 90.0) / 90.0;
        r *= 1.0 + kFatigue * played * played;
        if (extra_time) r *= kExtraTimeRate;
        if (last_goal_side_ == side)
            r *= 1.0 + kMomentum * std::exp(-(t - last_goal_minute_) / kMomentumMinutes);
        const int lead = total(side) - total(other(side));
        if (t >= kChaseFrom && lead < 0) r *= kChase;
        if (t >= kChaseFrom && lead > 0) r *= kProtect;
        r *= std::pow(kOwnRed, reds_[at(side)]) * std::pow(kOpponentRed, reds_[at(other(side))]);
        return r;
    }

    // Plays one period; false when the match was abandoned in it.
    bool play_period(core::Period period, double start, double length) {
        emit(core::PeriodStart{period}, {period, to_ms(start)});
        const bool extra =
            period == core::Period::extra_first || period == core::Period::extra_second;
        const double end = start + length;
        double stoppage = -1.0;  // announced at the nominal end
        int incidents = 0;
        for (long step = 0;; ++step) {
            const double t = start + static_cast<double>(step) * kStep;
            if (stoppage < 0.0 && t >= end) {
                const int base = extra ? rng_.between(0, 2)
                                       : (period == core::Period::first_half ? rng_.between(1, 3)
                                                                             : rng_.between(3, 6));
                const int minutes = std::min(base + incidents / 2, 12);
                emit(core::StoppageAnnounced{period, static_cast<std::uint16_t>(minutes)},
                     {period, to_ms(end)});
                // The referee plays the board's time and sometimes a little more.
                stoppage = minutes + rng_.uniform(0.0, 1.0);
            }
            if (stoppage >= 0.0 && t >= end + stoppage) break;
            const core::MatchClock clock{period, to_ms(t)};
            if (abandon_at_ >= 0.0 && t >= abandon_at_ && !extra) {
                emit(core::MatchAbandoned{"floodlights failed"}, clock);
                result_.abandoned = true;
                return false;
            }
            if (step > 0 && step % kStepsPerClockSync == 0) emit(core::ClockSync{true}, clock);
            if (injury_stop_at_ >= 0.0 && t >= injury_stop_at_) {
                injury_stop_at_ = -1.0;
                emit(core::ClockSync{false}, clock);  // clock held for treatment on the pitch
                wall_offset_us_ += 90'000'000;
                emit(core::ClockSync{true}, clock);
            }
            if (correction_at_ >= 0.0 && t >= correction_at_ && !pending_review_seq_) {
                correction_at_ = -1.0;  // the feed restates the score it believes in
                emit(core::ScoreCorrection{static_cast<std::uint16_t>(total(core::Side::home)),
                                           static_cast<std::uint16_t>(total(core::Side::away))},
                     clock);
            }
            if (pending_review_seq_ && t >= pending_review_at_) cancel_reviewed_goal(clock);
            for (const core::Side side : {core::Side::home, core::Side::away}) {
                const double r = rate(side, t, extra);
                if (rng_.chance(r * kShotsPerGoal * kStep))
                    emit(core::ShotXg{side, rng_.uniform(0.02, 0.35)}, clock);
                if (rng_.chance(r * kStep)) {
                    score(side, t, clock, extra);
                    ++incidents;
                }
                if (rng_.chance(kRedPerMinute * kStep)) {
                    send_off(side, clock);
                    ++incidents;
                }
            }
            if (pending_rescind_seq_ && t >= pending_rescind_at_) {
                emit(core::CardRescinded{pending_rescind_seq_}, clock);
                reds_[at(pending_rescind_side_)] -= 1;
                pending_rescind_seq_ = 0;
            }
        }
        const core::MatchClock final_clock{period, to_ms(end + stoppage)};
        if (pending_review_seq_) cancel_reviewed_goal(final_clock);
        emit(core::PeriodEnd{period}, final_clock);
        wall_offset_us_ += period == core::Period::first_half ? kHalfTimeUs : 5LL * 60 * 1'000'000;
        return true;
    }

    void score(core::Side side, double t, core::MatchClock clock, bool extra) {
        core::Goal goal{side, false, false};
        if (rng_.chance(kOwnGoalShare)) goal.own_goal = true;
        else if (rng_.chance(kPenaltyShare)) goal.penalty = true;
        const std::uint64_t seq = emit(goal, clock);
        (extra ? result_.extra_time_goals : result_.regulation_goals)[at(side)] += 1;
        last_goal_side_ = side;
        last_goal_minute_ = t;
        if (!pending_review_seq_ && rng_.chance(kReviewCancelShare)) {
            pending_review_seq_ = seq;
            pending_review_side_ = side;
            pending_review_extra_ = extra;
            pending_review_at_ = t + rng_.uniform(1.0, 3.0);
        }
    }

    void cancel_reviewed_goal(core::MatchClock clock) {
        emit(core::GoalCancelled{pending_review_seq_}, clock);
        (pending_review_extra_ ? result_.extra_time_goals
                               : result_.regulation_goals)[at(pending_review_side_)] -= 1;
        pending_review_seq_ = 0;
    }

    void send_off(core::Side side, core::MatchClock clock) {
        if (reds_[at(side)] >= 3) return;
        const std::uint64_t seq = emit(core::RedCard{side, rng_.chance(0.4)}, clock);
        reds_[at(side)] += 1;
        if (!pending_rescind_seq_ && rng_.chance(kRescindShare)) {
            pending_rescind_seq_ = seq;
            pending_rescind_side_ = side;
            pending_rescind_at_ =
                static_cast<double>(clock.clock_ms) / 60'000.0 + rng_.uniform(2.0, 6.0);
        }
    }

    void play_shootout() {
        const core::MatchClock clock{core::Period::shootout,
                                     period_start_ms(plan_.format, core::Period::shootout)};
        emit(core::PeriodStart{core::Period::shootout}, clock);
        const core::Side first = rng_.chance(0.5) ? core::Side::home : core::Side::away;
        std::array<int, 2> taken{}, scored{};
        auto conversion = [&](core::Side s) {
            const DemoClub& club = s == core::Side::home ? *plan_.home : *plan_.away;
            return std::clamp(0.74 + 0.15 * club.attack, 0.55, 0.9);
        };
        auto decided = [&] {
            const int left0 = std::max(0, 5 - taken[0]), left1 = std::max(0, 5 - taken[1]);
            if (taken[0] < 5 || taken[1] < 5)
                return scored[0] + left0 < scored[1] || scored[1] + left1 < scored[0];
            return taken[0] == taken[1] && scored[0] != scored[1];
        };
        core::Side kicker = first;
        while (!decided()) {
            const bool in = rng_.chance(conversion(kicker));
            taken[at(kicker)] += 1;
            if (in) scored[at(kicker)] += 1;
            emit(core::ShootoutKick{kicker, in}, clock);
            kicker = other(kicker);
        }
        result_.shootout_goals = scored;
        emit(core::PeriodEnd{core::Period::shootout}, clock);
    }

    const MatchPlan& plan_;
    PortableRandom rng_;
    SimulatedMatch result_;
    std::uint64_t seq_ = 0;
    std::int64_t wall_offset_us_ = 0;
    core::MatchClock last_clock_;
    double home_edge_ = 0.0;
    double abandon_at_, injury_stop_at_, correction_at_;
    std::array<int, 2> reds_{};
    std::optional<core::Side> last_goal_side_;
    double last_goal_minute_ = 0.0;
    std::uint64_t pending_review_seq_ = 0;
    core::Side pending_review_side_ = core::Side::home;
    bool pending_review_extra_ = false;
    double pending_review_at_ = 0.0;
    std::uint64_t pending_rescind_seq_ = 0;
    core::Side pending_rescind_side_ = core::Side::home;
    double pending_rescind_at_ = 0.0;
};

}  // namespace

core::PriorMeans published_prior(const MatchPlan& plan) {
    // The feed's estimate: true strengths with a shrunk, average home edge (it cannot know the
    // day's), and the simulator's mean fatigue over a match of about 96 minutes.
    const double edge = plan.neutral_venue ? 0.0 : 0.8 * plan.home->home_edge;
    const double exposure = 96.0 * (1.0 + kFatigue / 3.0) * kBaseGoalsPerMinute;
    return core::PriorMeans{exposure * std::exp(plan.home->attack - plan.away->defence + edge),
                            exposure * std::exp(plan.away->attack - plan.home->defence)};
}

SimulatedMatch simulate_match(const MatchPlan& plan) { return MatchPlay(plan).play(); }

}  // namespace liveprob::demo
