// The gateway's memory and limits over a season (issue 15), over real sockets: a ZeroMQ
// publisher in the test plays serve. Finished matches never count against a client's limits, a
// new watch-all client works whatever history the gateway holds, and finished matches leave
// after their retention while live ones stay.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <chrono>
#include <cstdint>
#include <set>
#include <string>

#include "fake_serve.hpp"
#include "web_clients.hpp"

using namespace std::chrono_literals;
using liveprob::core::MatchStatus;
using liveprob::test::eventually;
using liveprob::test::FakeServe;
using liveprob::test::gateway_counter;
using liveprob::test::RunningGateway;
using liveprob::test::test_config;
using liveprob::test::WebSocketClient;

namespace {

// The match id of an update frame ("match_id":N,), or 0.
std::uint64_t match_of(const std::string& frame) {
    const auto at = frame.find(R"("match_id":)");
    return at == std::string::npos ? 0 : std::stoull(frame.substr(at + 11));
}

std::string matches_json(std::uint16_t port) {
    return liveprob::test::http_request("127.0.0.1", port, "/api/matches").body;
}

bool lists(const std::string& state, std::uint64_t match_id) {
    return state.find(fmt::format(R"("match_id":{},)", match_id)) != std::string::npos;
}

}  // namespace

TEST_CASE("a new watch-all client works with 320 matches held, 300 of them finished",
          "[gateway][sockets]") {
    FakeServe serve;
    auto config = test_config(serve);
    REQUIRE(config.send_queue_cap < 320);  // the default limit is below the history held
    RunningGateway gateway(config);
    liveprob::test::wait_for_feed(serve, gateway.port(), 1);
    for (std::uint64_t id = 1; id <= 320; ++id) {
        serve.publish(id, 2, 0.5, 0, id <= 300 ? MatchStatus::finished : MatchStatus::in_play);
    }
    REQUIRE(eventually([&] { return gateway_counter(gateway.port(), "matches") == 320; }));

    WebSocketClient client(gateway.port());
    REQUIRE_FALSE(client.handshake_error());
    client.send(R"({"watch":"all"})");
    std::set<std::uint64_t> seen;
    while (seen.size() < 320) {
        const auto frame = client.receive_update(10s);
        REQUIRE(frame);
        seen.insert(match_of(*frame));
    }
    CHECK(*seen.begin() == 1);
    CHECK(*seen.rbegin() == 320);
    // Still served: a live match's next update arrives, and nobody was dropped.
    serve.publish(310, 3, 0.75);
    const auto next = client.receive_update(10s);
    REQUIRE(next);
    CHECK(next->find(R"("match_id":310,"update_seq":3,)") != std::string::npos);
    CHECK(gateway_counter(gateway.port(), "clients_dropped_slow") == 0);
    CHECK(gateway_counter(gateway.port(), "clients_open") == 1);
}

TEST_CASE("finished matches leave the gateway after their retention, live ones stay",
          "[gateway][sockets]") {
    FakeServe serve;
    auto config = test_config(serve);
    config.finished_retention = 300ms;
    RunningGateway gateway(config);
    liveprob::test::wait_for_feed(serve, gateway.port(), 1);  // match 1: in play
    serve.publish(2, 1, 0.5, 0, MatchStatus::finished);
    serve.publish(3, 1, 0.5, 0, MatchStatus::abandoned);
    REQUIRE(eventually([&] { return gateway_counter(gateway.port(), "matches_retired") == 2; }));
    const std::string state = matches_json(gateway.port());
    CHECK(lists(state, 1));
    CHECK_FALSE(lists(state, 2));
    CHECK_FALSE(lists(state, 3));
    CHECK(
        liveprob::test::http_request("127.0.0.1", gateway.port(), "/api/timeline?match=2").status ==
        404);
    CHECK(gateway_counter(gateway.port(), "matches") == 1);

    // A new watch-all client gets the live match only.
    WebSocketClient client(gateway.port());
    client.send(R"({"watch":"all"})");
    const auto first = client.receive_update();
    REQUIRE(first);
    CHECK(match_of(*first) == 1);
    CHECK_FALSE(client.receive_update(300ms));

    // The live match, once it ends, leaves too.
    serve.publish(1, 2, 0.9, 1, MatchStatus::finished);
    REQUIRE(eventually([&] { return gateway_counter(gateway.port(), "matches") == 0; }));
    CHECK(gateway_counter(gateway.port(), "matches_retired") == 3);
}
