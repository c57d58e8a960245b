// Folding a message in feed order and pricing the result allocate nothing in steady state
// (DESIGN.md, "Runtime": no allocation per event). Counted by replacing the global operator
// new in this test executable only.
#include <catch2/catch.hpp>

#include <atomic>
#include <cstdlib>
#include <new>

#include "feed_builder.hpp"
#include "heap_allocation_counter.hpp"
#include "liveprob/core/match.hpp"

using namespace liveprob;

using namespace liveprob::core;
using liveprob::test::at_minute;

TEST_CASE("applying messages in feed order and reading the outputs allocates nothing",
          "[match][allocation]") {
    MatchSetup setup;
    setup.prior = PriorMeans{1.5, 1.2};
    setup.format.extra_time = true;
    setup.format.shootout = true;
    Match match(3, setup,
                ModelParams{});  // full model: score effects, reds, Gamma mixture, knock-out
    test::FeedBuilder feed(3);
    const std::vector<InboundMessage> stream = {
        feed.start(Period::first_half, 0),
        feed.goal(Side::home, Period::first_half, 10),
        feed.shot(Side::away, 0.2, Period::first_half, 12),
        feed.red(Side::away, Period::first_half, 20),
        feed.next(ClockSync{true}, at_minute(Period::first_half, 25)),
        feed.goal(Side::away, Period::first_half, 30),
        feed.next(StoppageAnnounced{Period::first_half, 2}, at_minute(Period::first_half, 45)),
        feed.end(Period::first_half, 47),
        feed.start(Period::second_half, 45),
        feed.goal(Side::home, Period::second_half, 60)};
    // Warm up: the first pricing of each kind of state may size caches.
    (void)match.outputs();

    const long before = test::heap_allocations();
    double sum = 0.0;
    for (const auto& m : stream) {
        REQUIRE(match.apply(m).verdict == Verdict::accepted);
        sum += match.outputs().p_home;
        (void)match.advance_to(MatchClock{m.header.clock.period, m.header.clock.clock_ms + 30'000});
        sum += match.outputs().p_draw;
    }
    const long during = test::heap_allocations() - before;
    CHECK(sum > 0.0);
    CHECK(during == 0);
}

TEST_CASE("ticking with clock interpolation allocates nothing once the match is set up",
          "[match][allocation][interpolation]") {
    MatchSetup setup;
    setup.prior = PriorMeans{1.5, 1.2};
    setup.format.extra_time = true;
    setup.format.shootout = true;
    Match match(4, setup, ModelParams{});
    match.set_clock_interpolation(true);  // its one allocation: the interpolant
    test::FeedBuilder feed(4);
    REQUIRE(match.apply(feed.start(Period::first_half, 0)).verdict == Verdict::accepted);
    REQUIRE(match.apply(feed.goal(Side::home, Period::first_half, 10)).verdict ==
            Verdict::accepted);
    Outputs out;
    match.price_into(out);  // warm-up: per-thread pricing buffers

    const long before = test::heap_allocations();
    double sum = 0.0;
    // 25 minutes of ticks, a second apart: window solves, interpolated ticks, a message, a
    // second window.
    for (std::uint32_t s = 1; s <= 25 * 60; ++s) {
        if (s == 12 * 60) {
            REQUIRE(match.apply(feed.red(Side::away, Period::first_half, 10 + 12)).verdict ==
                    Verdict::accepted);
        }
        (void)match.advance_to(MatchClock{Period::first_half, 10 * 60'000 + s * 1000});
        match.price_into(out);
        sum += out.p_home;
    }
    const long during = test::heap_allocations() - before;
    CHECK(sum > 0.0);
    CHECK(during == 0);
}

TEST_CASE("a late message into a long match re-folds from a checkpoint without allocating",
          "[match][allocation][refold]") {
    MatchSetup setup;
    setup.prior = PriorMeans{1.5, 1.2};
    Match match(5, setup, ModelParams{});
    REQUIRE(match.refold_checkpoint_interval() == Match::kDefaultRefoldCheckpointInterval);
    auto message = [](std::uint64_t seq, MessageBody body) {
        InboundMessage m;
        m.header = {5,
                    seq,
                    1'700'000'000'000'000,
                    {Period::first_half, static_cast<std::uint32_t>(seq) * 500}};
        m.body = std::move(body);
        return m;
    };
    // 2,820 messages in feed order with even source_seq values (a goal every 100). The log's
    // room then holds 1,276 more, and the 201 below stay between the checkpoints at 2,816 and
    // 3,072 (laying a new one copies the goal records once), so only re-folds could allocate.
    REQUIRE(match.apply(message(2, PeriodStart{Period::first_half})).verdict == Verdict::accepted);
    for (std::uint64_t i = 2; i <= 2'820; ++i) {
        const MessageBody body =
            i % 100 == 0 ? MessageBody{Goal{Side::home}} : MessageBody{ShotXg{Side::away, 0.05}};
        REQUIRE(match.apply(message(2 * i, body)).verdict == Verdict::accepted);
    }
    REQUIRE(match.refold_checkpoint_bytes() > 0);
    // Warm-up: the first re-fold takes each slot's room as it stands.
    REQUIRE(match.apply(message(2 * 2'790 + 1, ShotXg{Side::home, 0.1})).verdict == Verdict::late);

    const long before = test::heap_allocations();
    std::uint64_t late = 0;
    // Late shots and clock syncs at depths from just behind the head to the middle of the log.
    for (std::uint64_t k = 0; k < 200; ++k) {
        const std::uint64_t entry = k % 2 == 0 ? 2'780 - k : 1'400 - k;
        const MessageBody body =
            k % 3 == 0 ? MessageBody{ClockSync{true}} : MessageBody{ShotXg{Side::home, 0.02}};
        late += match.apply(message(2 * entry + 1, body)).verdict == Verdict::late ? 1U : 0U;
    }
    const long during = test::heap_allocations() - before;
    CHECK(late == 200);
    CHECK(match.state().goals(Side::home) == 28);
    CHECK(during == 0);
}
