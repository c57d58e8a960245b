// The gateway's memory of matches (adapters/gateway latest_updates.hpp) on a simulated clock:
// a finished or abandoned match is forgotten once its retention has passed since its first final
// update; a live one never is; a correction that reopens a match restarts nothing until it ends
// again.
#include <catch2/catch.hpp>

#include <chrono>

#include "liveprob/gateway/latest_updates.hpp"

using liveprob::core::MatchStatus;
using liveprob::gateway::Arrival;
using liveprob::gateway::GatewayUpdate;
using liveprob::gateway::LatestUpdates;
using namespace std::chrono_literals;

namespace {

GatewayUpdate update(std::uint64_t match_id, std::uint64_t seq, MatchStatus status) {
    GatewayUpdate u{};
    u.match_id = match_id;
    u.output_seq = seq;
    u.input_seq = seq;
    u.outputs.status = status;
    u.outputs.p_home = 1.0;
    return u;
}

}  // namespace

TEST_CASE("latest updates: finished matches are forgotten after their retention, live ones never",
          "[unit][gateway]") {
    LatestUpdates held(16);
    const LatestUpdates::Clock::time_point t0{};
    CHECK(held.accept(update(1, 1, MatchStatus::in_play), t0).arrival == Arrival::first);
    held.accept(update(2, 1, MatchStatus::finished), t0);
    held.accept(update(3, 1, MatchStatus::abandoned), t0 + 5s);
    // A later final update (a republication) does not restart match 2's retention.
    held.accept(update(2, 2, MatchStatus::finished), t0 + 8s);
    REQUIRE(held.match_count() == 3);

    CHECK(held.forget_finished(t0 + 9s, 10s) == 0);
    CHECK(held.forget_finished(t0 + 10s, 10s) == 1);  // match 2: exactly its retention
    CHECK_FALSE(held.latest(2));
    CHECK(held.latest(3));
    CHECK(held.forget_finished(t0 + 15s, 10s) == 1);  // match 3
    CHECK(held.forget_finished(t0 + 1000h, 10s) == 0);
    CHECK(held.latest(1));  // live: kept for ever
    CHECK_FALSE(held.render_timeline_json(2));
}

TEST_CASE("latest updates: a match reopened by a correction is live until it ends again",
          "[unit][gateway]") {
    LatestUpdates held(16);
    const LatestUpdates::Clock::time_point t0{};
    held.accept(update(7, 1, MatchStatus::finished), t0);
    held.accept(update(7, 2, MatchStatus::in_play), t0 + 1s);  // a goal cancelled on review
    CHECK(held.forget_finished(t0 + 100s, 10s) == 0);
    held.accept(update(7, 3, MatchStatus::finished), t0 + 200s);
    CHECK(held.forget_finished(t0 + 209s, 10s) == 0);
    CHECK(held.forget_finished(t0 + 210s, 10s) == 1);
    // Forgotten means forgotten: its next update is a first one again.
    CHECK(held.accept(update(7, 4, MatchStatus::finished), t0 + 211s).arrival == Arrival::first);
}
