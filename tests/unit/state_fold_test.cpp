// The match-state fold step by step: what each message does, every correction, and every
// reason a message is refused (a refused message leaves the state exactly as it was).
#include <catch2/catch.hpp>

#include <cmath>
#include <limits>
#include <set>
#include <string>

#include "feed_builder.hpp"
#include "liveprob/core/intensity.hpp"
#include "liveprob/core/state_fold.hpp"
#include "liveprob/core/timing.hpp"

using namespace liveprob;

using namespace liveprob::core;
using liveprob::test::at_minute;
using liveprob::test::FeedBuilder;

namespace {

constexpr std::uint64_t kMatch = 41;
const PriorMeans kPrior{1.6, 1.1};

CompetitionFormat league() { return CompetitionFormat{}; }
CompetitionFormat knockout() {
    CompetitionFormat f;
    f.extra_time = true;
    f.shootout = true;
    return f;
}

// Folds messages one by one, requiring each to be applied.
struct Folding {
    StateFold fold;
    MatchState state;
    FeedBuilder feed{kMatch};

    explicit Folding(const CompetitionFormat& format, const ModelParams& params = ModelParams{})
        : fold(kMatch, format, kPrior, params), state(fold.initial_state()) {}

    void ok(const InboundMessage& m) {
        INFO("message " << kind_name(m.body) << " seq " << m.header.source_seq);
        REQUIRE(fold.screen(m) == RejectReason::none);
        REQUIRE(fold.apply(state, m) == RejectReason::none);
    }
    // Requires the message to be refused for `reason` with the state untouched.
    void refused(const InboundMessage& m, RejectReason reason) {
        INFO("message " << kind_name(m.body) << ", expected " << reject_reason_name(reason));
        RejectReason got = fold.screen(m);
        if (got == RejectReason::none) {
            const MatchState before = state;
            got = fold.apply(state, m);
            CHECK(state == before);
        }
        CHECK(std::string(reject_reason_name(got)) == reject_reason_name(reason));
    }
    void play_regulation_level() {
        ok(feed.start(Period::first_half, 0));
        ok(feed.end(Period::first_half, 47));
        ok(feed.start(Period::second_half, 45));
        ok(feed.end(Period::second_half, 94));
    }
};

}  // namespace

TEST_CASE("a league match folds to its score, cards and status", "[fold]") {
    Folding f(league());
    CHECK(f.state.status == MatchStatus::not_started);
    f.ok(f.feed.start(Period::first_half, 0));
    CHECK(f.state.status == MatchStatus::in_play);
    f.ok(f.feed.goal(Side::home, Period::first_half, 12));
    f.ok(f.feed.red(Side::away, Period::first_half, 30));
    f.ok(f.feed.end(Period::first_half, 46.5));
    CHECK(f.state.status == MatchStatus::interval);
    f.ok(f.feed.red(Side::home, Period::first_half, 46.5));  // shown during the interval
    f.ok(f.feed.start(Period::second_half, 45));
    f.ok(f.feed.goal(Side::away, Period::second_half, 70));
    f.ok(f.feed.goal(Side::away, Period::second_half, 91));
    f.ok(f.feed.whistle(Period::second_half, 95));
    CHECK(f.state.status == MatchStatus::finished);
    CHECK(f.state.goals(Side::home) == 1);
    CHECK(f.state.goals(Side::away) == 2);
    CHECK(f.state.reds == std::array<int, 2>{1, 1});
    CHECK(f.state.clock == at_minute(Period::second_half, 95));
}

TEST_CASE("corrections: a goal cancelled on review, a card rescinded, an absolute score",
          "[fold]") {
    Folding f(league());
    f.ok(f.feed.start(Period::first_half, 0));
    f.ok(f.feed.goal(Side::home, Period::first_half, 10));
    const std::uint64_t goal_seq = f.feed.last_seq();
    f.ok(f.feed.goal(Side::away, Period::first_half, 20));
    f.ok(f.feed.red(Side::away, Period::first_half, 25));
    const std::uint64_t card_seq = f.feed.last_seq();

    f.ok(f.feed.next(GoalCancelled{goal_seq}, at_minute(Period::first_half, 11)));
    CHECK(f.state.goals(Side::home) == 0);
    CHECK(f.state.goals(Side::away) == 1);
    f.refused(f.feed.next(GoalCancelled{goal_seq}, at_minute(Period::first_half, 12)),
              RejectReason::goal_already_cancelled);

    f.ok(f.feed.next(CardRescinded{card_seq}, at_minute(Period::first_half, 30)));
    CHECK(f.state.reds == std::array<int, 2>{0, 0});
    f.refused(f.feed.next(CardRescinded{card_seq}, at_minute(Period::first_half, 31)),
              RejectReason::card_already_rescinded);

    f.ok(f.feed.next(ScoreCorrection{3, 1}, at_minute(Period::first_half, 32)));
    CHECK(f.state.goals(Side::home) == 3);
    CHECK(f.state.goals(Side::away) == 1);
    f.ok(f.feed.next(ScoreCorrection{0, 0}, at_minute(Period::first_half, 33)));
    // The away goal's record still exists, but the corrected score has nothing to take from.
    f.refused(f.feed.next(GoalCancelled{goal_seq + 1}, at_minute(Period::first_half, 34)),
              RejectReason::score_below_zero);
}

TEST_CASE("a score correction in extra time keeps the regulation score", "[fold]") {
    Folding f(knockout());
    f.play_regulation_level();
    f.ok(f.feed.start(Period::extra_first, 90));
    f.ok(f.feed.next(ScoreCorrection{1, 0}, at_minute(Period::extra_first, 95)));
    CHECK(f.state.regulation_goals == std::array<int, 2>{0, 0});
    CHECK(f.state.extra_time_goals == std::array<int, 2>{1, 0});
    f.ok(f.feed.goal(Side::away, Period::extra_first, 100));
    CHECK(f.state.extra_time_goals == std::array<int, 2>{1, 1});
}

TEST_CASE("every reason a message is wrong in itself", "[fold][reject]") {
    Folding f(league());
    f.ok(f.feed.start(Period::first_half, 0));
    const MatchClock now = at_minute(Period::first_half, 20);

    FeedBuilder stranger(kMatch + 1, 100);
    f.refused(stranger.next(Goal{}, now), RejectReason::other_match);
    f.refused(f.feed.next(Goal{static_cast<Side>(2), false, false}, now),
              RejectReason::unknown_side);
    f.refused(f.feed.next(RedCard{static_cast<Side>(9), false}, now), RejectReason::unknown_side);
    f.refused(f.feed.next(ShootoutKick{static_cast<Side>(3), true}, now),
              RejectReason::unknown_side);
    f.refused(f.feed.next(ShotXg{static_cast<Side>(3), 0.1}, now), RejectReason::unknown_side);
    f.refused(f.feed.next(PeriodStart{static_cast<Period>(17)}, now), RejectReason::unknown_period);
    f.refused(f.feed.next(PeriodEnd{Period::finished}, now), RejectReason::unknown_period);
    f.refused(f.feed.next(StoppageAnnounced{Period::shootout, 3}, now),
              RejectReason::unknown_period);
    f.refused(f.feed.next(Goal{}, MatchClock{static_cast<Period>(40), 0}),
              RejectReason::unknown_period);
    for (double xg : {-0.01, 1.01, std::numeric_limits<double>::quiet_NaN(),
                      std::numeric_limits<double>::infinity()}) {
        f.refused(f.feed.next(ShotXg{Side::home, xg}, now), RejectReason::bad_xg);
    }
    f.refused(f.feed.next(StoppageAnnounced{Period::first_half, 31}, now),
              RejectReason::implausible_stoppage);
    f.refused(f.feed.next(ScoreCorrection{100, 0}, now), RejectReason::implausible_score);
    f.refused(f.feed.next(MatchSetup{}, now), RejectReason::setup_in_stream);
    // Nothing above changed the state.
    CHECK(f.state.goals(Side::home) == 0);
    CHECK(f.state.xg == std::array<double, 2>{0.0, 0.0});
}

TEST_CASE("every reason a message is impossible where it stands", "[fold][reject]") {
    SECTION("before kick-off") {
        Folding f(league());
        const MatchClock pre{Period::pre_match, 0};
        f.refused(f.feed.goal(Side::home, Period::first_half, 0), RejectReason::before_kickoff);
        f.refused(f.feed.next(Goal{}, pre), RejectReason::before_kickoff);
        f.refused(f.feed.next(RedCard{}, pre), RejectReason::before_kickoff);
        f.refused(f.feed.next(ShotXg{Side::away, 0.2}, pre), RejectReason::before_kickoff);
        f.refused(f.feed.next(ScoreCorrection{1, 0}, pre), RejectReason::before_kickoff);
        f.refused(f.feed.next(FinalWhistle{}, pre), RejectReason::before_kickoff);
        f.refused(f.feed.next(PeriodEnd{Period::first_half}, pre), RejectReason::before_kickoff);
        f.refused(f.feed.next(StoppageAnnounced{Period::first_half, 2}, pre),
                  RejectReason::before_kickoff);
        f.refused(f.feed.next(GoalCancelled{1}, pre), RejectReason::before_kickoff);
        f.refused(f.feed.next(CardRescinded{1}, pre), RejectReason::before_kickoff);
        f.refused(f.feed.kick(Side::home, true), RejectReason::kick_outside_shootout);
        f.ok(f.feed.next(ClockSync{false}, pre));  // a clock before kick-off is harmless
    }
    SECTION("periods out of order, not started, already over") {
        Folding f(league());
        f.refused(f.feed.start(Period::second_half, 45), RejectReason::period_out_of_order);
        f.ok(f.feed.start(Period::first_half, 0));
        f.refused(f.feed.start(Period::first_half, 1), RejectReason::period_out_of_order);
        f.refused(f.feed.end(Period::second_half, 90), RejectReason::period_out_of_order);
        f.refused(f.feed.goal(Side::home, Period::second_half, 50),
                  RejectReason::period_not_started);
        f.refused(f.feed.next(StoppageAnnounced{Period::second_half, 4},
                              at_minute(Period::first_half, 44)),
                  RejectReason::period_not_started);
        f.refused(f.feed.next(ClockSync{true}, at_minute(Period::second_half, 46)),
                  RejectReason::period_not_started);
        f.ok(f.feed.end(Period::first_half, 46));
        f.refused(f.feed.goal(Side::home, Period::first_half, 45.5),
                  RejectReason::period_already_over);
        f.refused(f.feed.next(StoppageAnnounced{Period::first_half, 2},
                              at_minute(Period::first_half, 46)),
                  RejectReason::period_already_over);
        f.ok(f.feed.start(Period::second_half, 45));
        f.refused(f.feed.goal(Side::away, Period::first_half, 44),
                  RejectReason::period_already_over);
        f.refused(f.feed.next(StoppageAnnounced{Period::first_half, 2},
                              at_minute(Period::second_half, 46)),
                  RejectReason::period_already_over);
        f.ok(f.feed.end(Period::second_half, 93));
        // A league plays no extra time and no shoot-out.
        f.refused(f.feed.start(Period::extra_first, 90), RejectReason::period_out_of_order);
        f.refused(f.feed.start(Period::shootout, 120), RejectReason::period_out_of_order);
    }
    SECTION("clock outside the period") {
        Folding f(league());
        f.ok(f.feed.start(Period::first_half, 0));
        f.ok(f.feed.end(Period::first_half, 45));
        f.ok(f.feed.start(Period::second_half, 45));
        f.refused(f.feed.goal(Side::home, Period::second_half, 30),
                  RejectReason::clock_outside_period);
        f.refused(f.feed.goal(Side::home, Period::second_half, 121),
                  RejectReason::clock_outside_period);
        f.refused(f.feed.next(ClockSync{true}, at_minute(Period::second_half, 10)),
                  RejectReason::clock_outside_period);
    }
    SECTION("cancelling or rescinding what the log does not hold") {
        Folding f(league());
        f.ok(f.feed.start(Period::first_half, 0));
        f.ok(f.feed.goal(Side::home, Period::first_half, 5));
        f.refused(f.feed.next(GoalCancelled{999}, at_minute(Period::first_half, 6)),
                  RejectReason::unknown_goal);
        // A card's sequence number does not name a goal, nor the reverse.
        f.ok(f.feed.red(Side::home, Period::first_half, 7));
        const std::uint64_t card = f.feed.last_seq();
        f.refused(f.feed.next(GoalCancelled{card}, at_minute(Period::first_half, 8)),
                  RejectReason::unknown_goal);
        f.refused(f.feed.next(CardRescinded{card - 1}, at_minute(Period::first_half, 8)),
                  RejectReason::unknown_card);
    }
    SECTION("the shoot-out: outside it, out of turn, after it is decided, goals in it") {
        Folding f(knockout());
        f.play_regulation_level();
        f.ok(f.feed.start(Period::extra_first, 90));
        f.refused(f.feed.kick(Side::home, true), RejectReason::kick_outside_shootout);
        f.ok(f.feed.end(Period::extra_first, 106));
        f.refused(f.feed.start(Period::shootout, 120), RejectReason::period_out_of_order);
        f.refused(f.feed.whistle(Period::extra_first, 106), RejectReason::final_whistle_too_early);
        f.ok(f.feed.start(Period::extra_second, 105));
        f.ok(f.feed.end(Period::extra_second, 121));
        f.refused(f.feed.whistle(Period::extra_second, 121), RejectReason::final_whistle_too_early);
        f.ok(f.feed.start(Period::shootout, 120));
        CHECK(f.state.status == MatchStatus::shootout);
        f.refused(f.feed.goal(Side::home, Period::shootout, 120), RejectReason::goal_in_shootout);
        f.refused(f.feed.shot(Side::home, 0.76, Period::shootout, 120),
                  RejectReason::period_not_running);
        f.ok(f.feed.kick(Side::away, true));  // away kicks first
        f.refused(f.feed.kick(Side::away, true), RejectReason::kick_out_of_turn);
        f.refused(f.feed.end(Period::shootout, 120), RejectReason::period_out_of_order);
        f.refused(f.feed.whistle(Period::shootout, 120), RejectReason::final_whistle_too_early);
        // Away scores three, home misses three: 3-0 with two kicks left each decides it.
        f.ok(f.feed.kick(Side::home, false));
        f.ok(f.feed.kick(Side::away, true));
        f.ok(f.feed.kick(Side::home, false));
        f.ok(f.feed.kick(Side::away, true));
        CHECK_FALSE(shootout_decided(f.state.shootout));
        f.ok(f.feed.kick(Side::home, false));
        CHECK(shootout_decided(f.state.shootout));
        f.refused(f.feed.kick(Side::away, true), RejectReason::shootout_already_decided);
        f.ok(f.feed.whistle(Period::shootout, 120));
        CHECK(f.state.shootout.scored == std::array<int, 2>{0, 3});
    }
    SECTION("after the final whistle and after abandonment") {
        Folding f(league());
        f.ok(f.feed.start(Period::first_half, 0));
        f.refused(f.feed.whistle(Period::first_half, 44), RejectReason::final_whistle_too_early);
        f.ok(f.feed.end(Period::first_half, 45));
        f.ok(f.feed.start(Period::second_half, 45));
        f.refused(f.feed.whistle(Period::second_half, 80), RejectReason::final_whistle_too_early);
        f.ok(f.feed.whistle(Period::second_half, 92));
        f.refused(f.feed.goal(Side::home, Period::second_half, 93),
                  RejectReason::after_final_whistle);
        f.refused(f.feed.start(Period::extra_first, 90), RejectReason::after_final_whistle);
        f.refused(f.feed.next(ScoreCorrection{1, 1}, at_minute(Period::second_half, 95)),
                  RejectReason::after_final_whistle);

        Folding g(league());
        g.ok(g.feed.start(Period::first_half, 0));
        g.ok(g.feed.goal(Side::away, Period::first_half, 10));
        g.ok(g.feed.next(MatchAbandoned{"floodlight failure"}, at_minute(Period::first_half, 30)));
        CHECK(g.state.status == MatchStatus::abandoned);
        CHECK(g.state.status_before_abandonment == MatchStatus::in_play);
        g.refused(g.feed.goal(Side::away, Period::first_half, 31), RejectReason::after_abandonment);
        g.refused(g.feed.whistle(Period::second_half, 90), RejectReason::after_abandonment);
    }
}

TEST_CASE("a knock-out level after regulation goes on, one side ahead may end", "[fold]") {
    Folding level(knockout());
    level.play_regulation_level();
    level.refused(level.feed.whistle(Period::second_half, 94),
                  RejectReason::final_whistle_too_early);

    Folding ahead(knockout());
    ahead.ok(ahead.feed.start(Period::first_half, 0));
    ahead.ok(ahead.feed.goal(Side::away, Period::first_half, 3));
    ahead.ok(ahead.feed.end(Period::first_half, 45));
    ahead.ok(ahead.feed.start(Period::second_half, 45));
    ahead.ok(ahead.feed.whistle(Period::second_half, 96));  // ends the half implicitly
    CHECK(ahead.state.status == MatchStatus::finished);

    // Second leg: 1-0 here after losing the first leg 0-1 is level on aggregate.
    CompetitionFormat second_leg = knockout();
    second_leg.first_leg = FirstLegResult{0, 1};
    Folding tie(second_leg);
    tie.ok(tie.feed.start(Period::first_half, 0));
    tie.ok(tie.feed.goal(Side::home, Period::first_half, 30));
    tie.ok(tie.feed.end(Period::first_half, 45));
    tie.ok(tie.feed.start(Period::second_half, 45));
    tie.refused(tie.feed.whistle(Period::second_half, 93), RejectReason::final_whistle_too_early);
    CHECK(aggregate_difference(tie.state, second_leg) == 0);
}

TEST_CASE("stoppage, xG and the clock", "[fold]") {
    Folding f(league());
    f.ok(f.feed.start(Period::first_half, 0));
    f.ok(f.feed.next(StoppageAnnounced{Period::first_half, 3}, at_minute(Period::first_half, 45)));
    CHECK(f.state.announced_stoppage[0] == 3);
    f.ok(f.feed.shot(Side::home, 0.31, Period::first_half, 46));
    f.ok(f.feed.shot(Side::home, 0.05, Period::first_half, 46.5));
    CHECK(f.state.xg_reported);
    CHECK(f.state.xg[0] == Approx(0.36).margin(1e-15));
    // A message stamped earlier than the clock is applied but does not wind the clock back.
    f.ok(f.feed.red(Side::away, Period::first_half, 40));
    CHECK(f.state.clock == at_minute(Period::first_half, 46.5));
    f.ok(f.feed.next(ClockSync{false}, at_minute(Period::first_half, 47)));
    CHECK_FALSE(f.state.clock_running);
    f.ok(f.feed.end(Period::first_half, 48));
    f.ok(f.feed.start(Period::second_half, 45));
    CHECK(f.state.clock_running);
    CHECK_FALSE(f.state.announced_stoppage[1].has_value());
}

// E_X = λ_X ∫ r(t) m_X(state(t)) dt over the play actually passed through (DESIGN.md, "The
// model" 4). The timing curve is normalised so a whole regulation match with the expected
// stoppage carries exposure 1 (timing.hpp), which makes a check that does not use the fold's
// own arithmetic: with no state effects and the halves ending at their expected stoppage, E_X
// is exactly λ_X.
TEST_CASE("the strength evidence integrates the prior rate over the states passed through",
          "[fold][exposure]") {
    const ModelParams plain = ModelParams::plain_poisson();
    const double first_end = 45.0 + plain.timing.expected_stoppage_first;
    const double second_end = 90.0 + plain.timing.expected_stoppage_second;
    {
        Folding f(league(), plain);
        f.ok(f.feed.start(Period::first_half, 0));
        f.ok(f.feed.goal(Side::home, Period::first_half, 20));
        f.ok(f.feed.red(Side::away, Period::first_half, 30));
        f.ok(f.feed.end(Period::first_half, first_end));
        f.ok(f.feed.start(Period::second_half, 45));
        f.ok(f.feed.end(Period::second_half, second_end));
        CHECK(f.state.exposure[0] == Approx(kPrior.home_goals).epsilon(1e-12));
        CHECK(f.state.exposure[1] == Approx(kPrior.away_goals).epsilon(1e-12));
    }
    {
        // With effects: the home side leads from 20' (rate × leading) and from 30' its
        // opponent is down a player (× opponent_per_card); the away side trails from 20' and
        // is down a player from 30'.
        const ModelParams full;
        Folding f(league(), full);
        f.ok(f.feed.start(Period::first_half, 0));
        f.ok(f.feed.goal(Side::home, Period::first_half, 20));
        f.ok(f.feed.red(Side::away, Period::first_half, 30));
        f.ok(f.feed.end(Period::first_half, 45));
        const TimingCurve& curve = f.fold.curve();
        const auto ms = [](double minute) { return static_cast<std::uint32_t>(minute * 60'000.0); };
        const double e_0_20 = curve.period_exposure(Period::first_half, 0, ms(20));
        const double e_20_30 = curve.period_exposure(Period::first_half, ms(20), ms(30));
        const double e_30_45 = curve.period_exposure(Period::first_half, ms(30), ms(45));
        const auto& s = full.score_state;
        const auto& r = full.red_cards;
        const double home = kPrior.home_goals * (s.level * e_0_20 + s.leading * e_20_30 +
                                                 s.leading * r.opponent_per_card * e_30_45);
        const double away = kPrior.away_goals * (s.level * e_0_20 + s.trailing * e_20_30 +
                                                 s.trailing * r.own_per_card * e_30_45);
        CHECK(f.state.exposure[0] == Approx(home).epsilon(1e-13));
        CHECK(f.state.exposure[1] == Approx(away).epsilon(1e-13));
    }
}

TEST_CASE("reject reason names are stable and distinct", "[fold][reject]") {
    std::set<std::string> names;
    for (int i = 0; i < kRejectReasonCount; ++i)
        names.insert(reject_reason_name(static_cast<RejectReason>(i)));
    CHECK(names.size() == static_cast<std::size_t>(kRejectReasonCount));
    CHECK(names.count("unknown") == 0);
    CHECK(std::string(reject_reason_name(RejectReason::before_kickoff)) == "before_kickoff");
    CHECK(std::string(reject_reason_name(static_cast<RejectReason>(200))) == "unknown");
}
