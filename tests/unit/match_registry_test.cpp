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
