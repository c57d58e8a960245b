// The Match API over its event log: duplicates, late messages and re-folds, the clock, and
// the outputs at the end (the result) and after abandonment (frozen).
#include <catch2/catch.hpp>

#include <stdexcept>

#include "feed_builder.hpp"
#include "liveprob/core/match.hpp"

using namespace liveprob;

using namespace liveprob::core;
using liveprob::test::at_minute;
using liveprob::test::FeedBuilder;

namespace {

constexpr std::uint64_t kMatch = 9;

MatchSetup setup_with(double home, double away, CompetitionFormat format = {}) {
    MatchSetup s;
    s.home_name = "Harbour Town";
    s.away_name = "Upland Rovers";
    s.prior = PriorMeans{home, away};
    s.format = format;
    return s;
}

CompetitionFormat knockout() {
    CompetitionFormat f;
    f.extra_time = true;
    f.shootout = true;
    return f;
}

bool same_outputs(const Outputs& a, const Outputs& b) {
    return a.status == b.status && a.clock == b.clock && a.home_goals == b.home_goals &&
           a.away_goals == b.away_goals && a.p_home == b.p_home && a.p_draw == b.p_draw &&
           a.p_away == b.p_away && a.p_advance_home == b.p_advance_home &&
           a.expected_home_goals == b.expected_home_goals && a.next_goal_home == b.next_goal_home &&
           a.p_over == b.p_over && a.p_both_score == b.p_both_score &&
           a.goals_added == b.goals_added && a.tail_mass == b.tail_mass &&
           a.events_applied == b.events_applied;
}

}  // namespace

TEST_CASE("a duplicate changes nothing, a conflicting one is counted", "[match]") {
    Match match(kMatch, setup_with(1.4, 1.2));
    FeedBuilder feed(kMatch);
    REQUIRE(match.apply(feed.start(Period::first_half, 0)).verdict == Verdict::accepted);
    const InboundMessage goal = feed.goal(Side::home, Period::first_half, 14);
    REQUIRE(match.apply(goal).verdict == Verdict::accepted);
    const MatchState state = match.state();
    const Outputs out = match.outputs();

    CHECK(match.apply(goal) == ApplyResult{Verdict::duplicate, RejectReason::none});
    InboundMessage other = goal;
    other.body = Goal{Side::away, false, false};
    CHECK(match.apply(other).verdict == Verdict::duplicate);
    CHECK(match.state() == state);
    CHECK(same_outputs(match.outputs(), out));
    CHECK(match.counters().duplicates == 2);
    CHECK(match.counters().conflicting_duplicates == 1);
    CHECK(match.log_size() == 2);
}

TEST_CASE("a late message is inserted and the log re-folded", "[match]") {
    FeedBuilder feed(kMatch);
    const auto kickoff = feed.start(Period::first_half, 0);
    const auto goal = feed.goal(Side::away, Period::first_half, 20);
    const auto red = feed.red(Side::home, Period::first_half, 30);
    const auto shot = feed.shot(Side::home, 0.4, Period::first_half, 35);

    Match in_order(kMatch, setup_with(1.5, 1.0));
    for (const auto& m : {kickoff, goal, red, shot})
        REQUIRE(in_order.apply(m).verdict == Verdict::accepted);

    Match shuffled(kMatch, setup_with(1.5, 1.0));
    CHECK(shuffled.apply(red).verdict == Verdict::rejected);  // before kick-off, as far as known
    CHECK(shuffled.apply(shot).verdict == Verdict::rejected);
    CHECK(shuffled.apply(kickoff).verdict == Verdict::late);  // ... and now both apply
    CHECK(shuffled.state().reds[0] == 1);
    CHECK(shuffled.apply(goal).verdict == Verdict::late);
    CHECK(shuffled.state() == in_order.state());
    CHECK(same_outputs(shuffled.outputs(), in_order.outputs()));
    CHECK(shuffled.counters().late == 2);
    CHECK(shuffled.counters().rejected == 2);
    CHECK(shuffled.counters()
              .rejected_by_reason[static_cast<std::size_t>(RejectReason::before_kickoff)] == 2);
}

TEST_CASE("a message wrong in itself never enters the log", "[match]") {
    Match match(kMatch, setup_with(1.3, 1.3));
    FeedBuilder stranger(kMatch + 5);
    const auto r = match.apply(stranger.start(Period::first_half, 0));
    CHECK(r == ApplyResult{Verdict::rejected, RejectReason::other_match});
    CHECK(match.log_size() == 0);
    CHECK(
        match.counters().rejected_by_reason[static_cast<std::size_t>(RejectReason::other_match)] ==
        1);
}

TEST_CASE("the clock: advancing drifts the price, the next message re-anchors it",
          "[match][clock]") {
    Match match(kMatch, setup_with(1.4, 1.1));
    FeedBuilder feed(kMatch);
    CHECK_FALSE(match.advance_to(at_minute(Period::first_half, 5)));  // not started
    REQUIRE(match.apply(feed.start(Period::first_half, 0)).verdict == Verdict::accepted);
    REQUIRE(match.apply(feed.next(ClockSync{true}, at_minute(Period::first_half, 10))).verdict ==
            Verdict::accepted);
    const MatchState folded = match.state();
    const double draw_at_10 = match.outputs().p_draw;

    CHECK(match.advance_to(at_minute(Period::first_half, 30)));
    CHECK(match.priced_clock() == at_minute(Period::first_half, 30));
    CHECK(match.outputs().p_draw > draw_at_10);  // at 0-0 the draw grows as time runs
    CHECK(match.state() == folded);              // time is an input: the fold did not move
    CHECK_FALSE(match.advance_to(at_minute(Period::first_half, 9)));
    CHECK_FALSE(match.advance_to(at_minute(Period::second_half, 50)));
    // Far beyond the half: held at the latest clock the half can reach.
    CHECK(match.advance_to(at_minute(Period::first_half, 500)));
    CHECK(
        match.priced_clock() ==
        MatchClock{Period::first_half, period_latest_ms(CompetitionFormat{}, Period::first_half)});

    // The feed's next message anchors the clock to its own reading (12', not 75+30').
    REQUIRE(match.apply(feed.next(ClockSync{false}, at_minute(Period::first_half, 12))).verdict ==
            Verdict::accepted);
    CHECK(match.priced_clock() == at_minute(Period::first_half, 12));
    CHECK_FALSE(match.advance_to(at_minute(Period::first_half, 13)));  // clock stopped
    REQUIRE(match.apply(feed.next(ClockSync{true}, at_minute(Period::first_half, 12))).verdict ==
            Verdict::accepted);
    CHECK(match.advance_to(at_minute(Period::first_half, 13)));
}

TEST_CASE("after the final whistle the outputs are the result", "[match][settled]") {
    Match match(kMatch, setup_with(1.6, 0.9));
    FeedBuilder feed(kMatch);
    for (const auto& m :
         {feed.start(Period::first_half, 0), feed.goal(Side::away, Period::first_half, 8),
          feed.goal(Side::home, Period::first_half, 30), feed.end(Period::first_half, 46),
          feed.start(Period::second_half, 45), feed.goal(Side::home, Period::second_half, 88),
          feed.end(Period::second_half, 94)}) {
        REQUIRE(match.apply(m).verdict == Verdict::accepted);
    }
    // Regulation is over and a league plays nothing more: already the result ...
    CHECK(match.outputs().status == MatchStatus::interval);
    CHECK(match.outputs().p_home == 1.0);
    REQUIRE(match.apply(feed.whistle(Period::second_half, 94)).verdict == Verdict::accepted);
    const Outputs& out = match.outputs();
    CHECK(out.status == MatchStatus::finished);
    CHECK(out.p_home == 1.0);
    CHECK(out.p_draw == 0.0);
    CHECK(out.p_away == 0.0);
    CHECK(out.goals_added[0][0] == 1.0);
    CHECK(out.tail_mass == 0.0);
    CHECK(out.next_goal_none == 1.0);
    CHECK(out.expected_home_goals == 2.0);
    CHECK(out.expected_away_goals == 1.0);
    CHECK(out.p_over == std::array<double, kTotalsLines>{1, 1, 1, 0, 0, 0});
    CHECK(out.p_both_score == 1.0);
    CHECK_FALSE(out.has_advance);
    CHECK(match.apply(feed.goal(Side::away, Period::second_half, 95)).reason ==
          RejectReason::after_final_whistle);
}

TEST_CASE("a knock-out decided by the shoot-out advances its winner", "[match][settled]") {
    // Without a first-kicker edge a level round leaves the kicking-first side's chance where it
    // was, so home's chance never falls below.
    ModelParams params;
    params.shootout.first_kicker_edge = 0.0;
    Match match(kMatch, setup_with(1.2, 1.2, knockout()), params);
    FeedBuilder feed(kMatch);
    for (const auto& m : {feed.start(Period::first_half, 0), feed.end(Period::first_half, 45),
                          feed.start(Period::second_half, 45), feed.end(Period::second_half, 92),
                          feed.start(Period::extra_first, 90), feed.end(Period::extra_first, 105),
                          feed.start(Period::extra_second, 105),
                          feed.end(Period::extra_second, 121), feed.start(Period::shootout, 120)}) {
        REQUIRE(match.apply(m).verdict == Verdict::accepted);
    }
    CHECK(match.outputs().status == MatchStatus::shootout);
    CHECK(match.outputs().has_advance);
    double previous_home = match.outputs().p_advance_home;
    // Home kicks first and scores every kick; away misses its third.
    const bool away_scores[] = {true, true, false};
    for (bool away : away_scores) {
        REQUIRE(match.apply(feed.kick(Side::home, true)).verdict == Verdict::accepted);
        REQUIRE(match.apply(feed.kick(Side::away, away)).verdict == Verdict::accepted);
        CHECK(match.outputs().p_advance_home + match.outputs().p_advance_away ==
              Approx(1.0).margin(1e-12));
        CHECK(match.outputs().p_advance_home >= previous_home - 1e-12);
        previous_home = match.outputs().p_advance_home;
    }
    REQUIRE(match.apply(feed.kick(Side::home, true)).verdict == Verdict::accepted);  // 4-2
    REQUIRE(match.apply(feed.end(Period::shootout, 120)).reason ==
            RejectReason::period_out_of_order);
    REQUIRE(match.apply(feed.kick(Side::away, false)).verdict ==
            Verdict::accepted);  // away cannot catch up
    CHECK(match.outputs().p_advance_home == Approx(1.0).margin(1e-12));
    REQUIRE(match.apply(feed.end(Period::shootout, 120)).verdict == Verdict::accepted);
    REQUIRE(match.apply(feed.whistle(Period::shootout, 120)).verdict == Verdict::accepted);
    CHECK(match.outputs().p_advance_home == 1.0);
    CHECK(match.outputs().p_advance_away == 0.0);
    CHECK(match.outputs().p_draw == 1.0);  // level at full time
}

TEST_CASE("after abandonment the outputs stay as they were, marked abandoned",
          "[match][abandoned]") {
    Match match(kMatch, setup_with(1.4, 1.4));
    FeedBuilder feed(kMatch);
    REQUIRE(match.apply(feed.start(Period::first_half, 0)).verdict == Verdict::accepted);
    REQUIRE(match.apply(feed.goal(Side::home, Period::first_half, 25)).verdict ==
            Verdict::accepted);
    const Outputs before = match.outputs();
    REQUIRE(match
                .apply(feed.next(MatchAbandoned{"pitch waterlogged"},
                                 at_minute(Period::first_half, 31)))
                .verdict == Verdict::accepted);
    const Outputs& out = match.outputs();
    CHECK(out.status == MatchStatus::abandoned);
    CHECK(out.p_home == before.p_home);
    CHECK(out.p_draw == before.p_draw);
    CHECK(out.goals_added == before.goals_added);
    CHECK(out.clock == before.clock);
    CHECK_FALSE(match.advance_to(at_minute(Period::first_half, 40)));
    CHECK(match.apply(feed.goal(Side::home, Period::first_half, 32)).reason ==
          RejectReason::after_abandonment);
}

TEST_CASE("a setup the engine cannot price is refused at creation", "[match]") {
    MatchSetup no_prior;
    no_prior.ratings = RatingReference{"north", "south"};
    CHECK_THROWS_AS(Match(kMatch, no_prior), std::invalid_argument);
    CHECK_THROWS_AS(Match(kMatch, setup_with(-1.0, 1.0)), std::invalid_argument);
    CHECK_THROWS_AS(Match(kMatch, setup_with(1.0, std::numeric_limits<double>::quiet_NaN())),
                    std::invalid_argument);
    CompetitionFormat zero_half;
    zero_half.half_minutes = 0;
    CHECK_THROWS_AS(Match(kMatch, setup_with(1.0, 1.0, zero_half)), std::invalid_argument);
    ModelParams bad;
    bad.quadrature_nodes = 0;
    CHECK_THROWS(Match(kMatch, setup_with(1.0, 1.0), bad));
}
