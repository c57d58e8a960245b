// The service's match registry: messages for a match whose setup has not arrived (an unknown match)
// wait in a bounded room and are applied, in arrival order, when the setup comes; past the
// bound they are dropped and reported, never applied and never blocking anything.
#include <catch2/catch.hpp>

#include <chrono>
#include <vector>

#include "feed_builder.hpp"
#include "liveprob/service/match_registry.hpp"

using namespace liveprob;
using namespace liveprob::service;

using namespace liveprob::core;
using service::MatchRegistry;
using service::MessageOutcome;
using test::at_minute;

namespace {
InboundMessage setup_message(test::FeedBuilder& feed) {
    MatchSetup setup;
    setup.prior = PriorMeans{1.4, 1.1};
    return feed.next(setup, MatchClock{Period::pre_match, 0});
}
}  // namespace

TEST_CASE("messages for an unknown match wait for its setup and are then applied in order",
          "[match_registry]") {
    MatchRegistry registry{ModelParams{}};
    const auto now = std::chrono::steady_clock::now();
    std::vector<std::uint64_t> touched;
    test::FeedBuilder feed(41);
    const InboundMessage setup = setup_message(feed);
    const InboundMessage kickoff = feed.start(Period::first_half, 0);
    const InboundMessage goal = feed.goal(Side::away, Period::first_half, 12);

    CHECK(registry.handle(kickoff, 1, now, touched) == MessageOutcome::waiting);
    CHECK(registry.handle(goal, 2, now, touched) == MessageOutcome::waiting);
    CHECK(registry.find(41) == nullptr);
    CHECK(registry.waiting_messages() == 2);
    CHECK(touched.empty());

    CHECK(registry.handle(setup, 3, now, touched) == MessageOutcome::created);
    REQUIRE(registry.find(41) != nullptr);
    CHECK(registry.waiting_messages() == 0);
    CHECK(touched == std::vector<std::uint64_t>{41});
    const auto& match = registry.find(41)->match;
    CHECK(match.state().goals(Side::away) == 1);
    CHECK(match.state().goals(Side::home) == 0);
    CHECK(match.counters().accepted == 2);
    CHECK(match.counters().rejected == 0);
}

TEST_CASE(
    "the waiting room is bounded per match and in matches, and the excess is dropped and reported",
    "[match_registry]") {
    MatchRegistry registry{ModelParams{}};
    const auto now = std::chrono::steady_clock::now();
    std::vector<std::uint64_t> touched;

    SECTION("one match with too many messages before its setup") {
        test::FeedBuilder feed(7, 2);
        for (std::size_t i = 0; i < service::kMaxWaitingPerMatch; ++i) {
            REQUIRE(registry.handle(feed.shot(Side::home, 0.1, Period::first_half, 1), 1, now,
                                    touched) == MessageOutcome::waiting);
        }
        CHECK(registry.handle(feed.shot(Side::home, 0.1, Period::first_half, 1), 1, now, touched) ==
              MessageOutcome::waiting_overflow);
        CHECK(registry.waiting_messages() == service::kMaxWaitingPerMatch);
    }
    SECTION("too many unknown matches") {
        for (std::uint64_t id = 1; id <= service::kMaxWaitingMatches; ++id) {
            test::FeedBuilder feed(id, 2);
            REQUIRE(registry.handle(feed.start(Period::first_half, 0), 1, now, touched) ==
                    MessageOutcome::waiting);
        }
        test::FeedBuilder one_more(service::kMaxWaitingMatches + 1, 2);
        CHECK(registry.handle(one_more.start(Period::first_half, 0), 1, now, touched) ==
              MessageOutcome::waiting_overflow);
        CHECK(registry.waiting_messages() == service::kMaxWaitingMatches);
        // A match already waiting still takes messages up to its own bound.
        test::FeedBuilder first(1, 3);
        CHECK(registry.handle(first.goal(Side::home, Period::first_half, 5), 1, now, touched) ==
              MessageOutcome::waiting);
    }
    CHECK(touched.empty());
    CHECK(registry.matches().empty());
}

TEST_CASE("a finished match leaves memory after the retention, its verdicts stay in the totals",
          "[match_registry]") {
    using std::chrono::seconds;
    MatchRegistry registry{ModelParams{}, RegistryLimits{seconds(600), seconds(60), 50000}};
    const auto t0 = std::chrono::steady_clock::now();
    std::vector<std::uint64_t> touched;
    test::FeedBuilder done(5), playing(6);
    for (test::FeedBuilder* feed : {&done, &playing}) {
        REQUIRE(registry.handle(setup_message(*feed), 1, t0, touched) == MessageOutcome::created);
        REQUIRE(registry.handle(feed->start(Period::first_half, 0), 1, t0, touched) ==
                MessageOutcome::applied);
    }
    REQUIRE(registry.handle(done.end(Period::first_half, 46), 1, t0, touched) ==
            MessageOutcome::applied);
    REQUIRE(registry.handle(done.start(Period::second_half, 45), 1, t0, touched) ==
            MessageOutcome::applied);
    REQUIRE(registry.handle(done.whistle(Period::second_half, 93), 1, t0 + seconds(10), touched) ==
            MessageOutcome::applied);
    REQUIRE_FALSE(registry.find(5)->live());
    const std::uint64_t accepted_before = registry.totals().accepted;

    CHECK(registry.retire(t0 + seconds(609)).matches == 0);  // 599 s after its end
    CHECK(registry.find(5) != nullptr);
    CHECK(registry.retire(t0 + seconds(610)).matches == 1);
    CHECK(registry.find(5) == nullptr);
    CHECK(registry.find(6) != nullptr);  // live matches stay, however old
    CHECK(registry.retire(t0 + seconds(100000)).matches == 0);
    CHECK(registry.totals().accepted == accepted_before);
}

TEST_CASE("waiting messages expire, so junk ids cannot keep a real match sent setup-last out",
          "[match_registry]") {
    using std::chrono::seconds;
    MatchRegistry registry{ModelParams{}, RegistryLimits{seconds(600), seconds(60), 50000}};
    const auto t0 = std::chrono::steady_clock::now();
    std::vector<std::uint64_t> touched;
    for (std::uint64_t id = 1000; id < 1000 + service::kMaxWaitingMatches; ++id) {
        test::FeedBuilder junk(id, 2);
        REQUIRE(registry.handle(junk.start(Period::first_half, 0), 1, t0, touched) ==
                MessageOutcome::waiting);
    }
    test::FeedBuilder real(77);
    CHECK(registry.handle(real.start(Period::first_half, 0), 1, t0, touched) ==
          MessageOutcome::waiting_overflow);  // the room is full of junk

    CHECK(registry.retire(t0 + seconds(59)).waiting_expired == 0);
    CHECK(registry.retire(t0 + seconds(60)).waiting_expired == service::kMaxWaitingMatches);
    CHECK(registry.waiting_messages() == 0);

    const auto t1 = t0 + seconds(61);
    const InboundMessage setup = setup_message(real);
    CHECK(registry.handle(real.start(Period::first_half, 0), 1, t1, touched) ==
          MessageOutcome::waiting);
    CHECK(registry.handle(real.goal(Side::home, Period::first_half, 3), 1, t1, touched) ==
          MessageOutcome::waiting);
    CHECK(registry.handle(setup, 1, t1 + seconds(5), touched) == MessageOutcome::created);
    REQUIRE(registry.find(77) != nullptr);
    CHECK(registry.find(77)->match.state().goals(Side::home) == 1);
}

TEST_CASE("one match accepts at most its cap of messages, the rest are refused and change nothing",
          "[match_registry]") {
    using std::chrono::seconds;
    MatchRegistry registry{ModelParams{}, RegistryLimits{seconds(600), seconds(60), 4}};
    const auto now = std::chrono::steady_clock::now();
    std::vector<std::uint64_t> touched;
    test::FeedBuilder feed(9);
    REQUIRE(registry.handle(setup_message(feed), 1, now, touched) == MessageOutcome::created);
    REQUIRE(registry.handle(feed.start(Period::first_half, 0), 1, now, touched) ==
            MessageOutcome::applied);
    REQUIRE(registry.handle(feed.goal(Side::home, Period::first_half, 3), 1, now, touched) ==
            MessageOutcome::applied);
    REQUIRE(registry.handle(feed.goal(Side::home, Period::first_half, 4), 1, now, touched) ==
            MessageOutcome::applied);
    touched.clear();
    CHECK(registry.handle(feed.goal(Side::away, Period::first_half, 5), 1, now, touched) ==
          MessageOutcome::over_cap);
    CHECK(touched.empty());
    CHECK(registry.find(9)->match.state().goals(Side::away) == 0);
    CHECK(registry.find(9)->match.state().goals(Side::home) == 2);
}
