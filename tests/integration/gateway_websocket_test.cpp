// The gateway over real sockets: a ZeroMQ publisher in the test plays `serve`, the gateway runs
// on its own thread, and Beast WebSocket / HTTP clients talk to it over loopback. Each case
// provokes one behaviour of issue 7: match subscription, late joiners, conflation for a slow
// reader, the send-queue cap and its close code, origin rejection, the message size limit, the
// idle time-out, and rejected feed input.
#include <catch2/catch.hpp>

#include <fmt/format.h>
#include <boost/asio/connect.hpp>
#include <boost/asio/io_context.hpp>
#include <boost/asio/ip/tcp.hpp>
#include <boost/beast/core.hpp>
#include <boost/beast/http.hpp>
#include <boost/beast/websocket.hpp>
#include <zmq.hpp>

#include <chrono>
#include <functional>
#include <optional>
#include <string>
#include <thread>
#include <vector>

#include "fake_serve.hpp"
#include "liveprob/gateway/gateway.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/transport/topics.hpp"
#include "test_env.hpp"
#include "web_clients.hpp"

namespace {

namespace asio = boost::asio;
namespace beast = boost::beast;
namespace http = beast::http;
namespace websocket = beast::websocket;
using asio::ip::tcp;
using namespace std::chrono_literals;

using liveprob::test::FakeServe;
using liveprob::test::RunningGateway;
using liveprob::test::test_config;

using liveprob::test::HttpAnswer;

HttpAnswer http_get(std::uint16_t port, const std::string& target,
                    http::verb verb = http::verb::get) {
    return liveprob::test::http_request("127.0.0.1", port, target,
                                        std::string(http::to_string(verb)));
}

using liveprob::test::eventually;
using liveprob::test::wait_for_feed;

std::uint64_t counter(std::uint16_t port, const std::string& name) {
    return liveprob::test::gateway_counter(port, name);
}

using TestClient = liveprob::test::WebSocketClient;

bool has(const std::string& frame, const std::string& part) {
    return frame.find(part) != std::string::npos;
}

}  // namespace

TEST_CASE("a client receives the matches it watches and no others", "[gateway][sockets]") {
    FakeServe serve;
    RunningGateway gateway(test_config(serve));
    wait_for_feed(serve, gateway.port(), 7);

    TestClient client(gateway.port());
    REQUIRE_FALSE(client.handshake_error());
    client.send(R"({"watch":[7]})");
    const auto reply = client.receive();
    REQUIRE(reply);
    CHECK(has(*reply, R"("kind":"watching","all":false,"match_ids":[7])"));
    // A late joiner gets the latest state straight away.
    const auto first = client.receive_update();
    REQUIRE(first);
    CHECK(has(*first, R"("match_id":7,"update_seq":1,)"));

    serve.publish(8, 1, 0.25);  // not watched
    serve.publish(7, 2, 0.625);
    const auto next = client.receive_update();
    REQUIRE(next);
    CHECK(has(*next, R"("match_id":7,"update_seq":2,)"));
    // Exactly the published double: 0.625, (1 - 0.625) / 2 = 0.1875 and the remainder.
    CHECK(has(*next, fmt::format(R"("full_time":{{"home":{},"draw":{},"away":{}}})", 0.625, 0.1875,
                                 1.0 - 0.625 - 0.1875)));
    CHECK(has(*next, R"("period":"second_half","clock_ms":2702000,)"));
    CHECK_FALSE(client.receive_update(300ms));  // nothing of match 8 came through
}

TEST_CASE("watching all delivers every match, including ones that start later",
          "[gateway][sockets]") {
    FakeServe serve;
    RunningGateway gateway(test_config(serve));
    wait_for_feed(serve, gateway.port(), 1);
    TestClient client(gateway.port());
    client.send(R"({"watch":"all"})");
    REQUIRE(client.receive_update());  // match 1, already known
    serve.publish(2, 1, 0.4);
    const auto later = client.receive_update();
    REQUIRE(later);
    CHECK(has(*later, R"("match_id":2,)"));

    client.send(R"({"unwatch":"all"})");
    REQUIRE(client.receive());  // the reply
    serve.publish(2, 2, 0.4);
    CHECK_FALSE(client.receive_update(300ms));
}

TEST_CASE("a bad request gets an error reply and the connection stays usable",
          "[gateway][sockets]") {
    FakeServe serve;
    RunningGateway gateway(test_config(serve));
    wait_for_feed(serve, gateway.port(), 3);
    TestClient client(gateway.port());
    client.send(R"({"watch":"some"})");
    const auto reply = client.receive();
    REQUIRE(reply);
    CHECK(has(*reply, R"("kind":"error","reason":"a string value must be \"all\"")"));
    client.send("not json at all");
    REQUIRE(client.receive());
    client.send(R"({"watch":[3]})");
    REQUIRE(client.receive_update());
    CHECK(counter(gateway.port(), "bad_requests") == 2);
}

TEST_CASE("a slow reader gets the latest value of each match, not every value",
          "[gateway][sockets]") {
    FakeServe serve;
    auto config = test_config(serve);
    config.client_send_buffer_bytes = 4096;
    RunningGateway gateway(config);
    wait_for_feed(serve, gateway.port(), 5);

    TestClient client(gateway.port(), std::nullopt, 4096);
    client.send(R"({"watch":[5]})");
    REQUIRE(client.receive());
    REQUIRE(client.receive_update());
    // The client stops reading while 3,000 updates of match 5 go out: far more than the
    // socket buffers hold, so the gateway must conflate.
    constexpr std::uint64_t kLast = 3001;
    for (std::uint64_t seq = 2; seq <= kLast; ++seq) serve.publish(5, seq, 0.5);
    REQUIRE(eventually([&] {
        return http_get(gateway.port(), "/api/matches")
                   .body.find(fmt::format("\"update_seq\":{},", kLast)) != std::string::npos;
    }));
    std::uint64_t received = 0;
    std::string last;
    while (auto frame = client.receive_update(500ms)) {
        ++received;
        last = *frame;
    }
    CHECK(received < kLast - 1);
    CHECK(has(last, fmt::format(R"("update_seq":{},)", kLast)));  // the latest always arrives
    CHECK(counter(gateway.port(), "frames_conflated") > 0);
}

TEST_CASE("a client too far behind is closed with code 4001 while others carry on",
          "[gateway][sockets]") {
    FakeServe serve;
    auto config = test_config(serve);
    config.client_send_buffer_bytes = 4096;
    config.send_stall_limit = 500ms;
    RunningGateway gateway(config);
    wait_for_feed(serve, gateway.port(), 1);

    TestClient stalled(gateway.port(), std::nullopt, 4096);
    stalled.send(R"({"watch":"all"})");
    TestClient healthy(gateway.port());
    healthy.send(R"({"watch":[1]})");
    REQUIRE(healthy.receive());
    REQUIRE(healthy.receive_update());

    // Twenty matches, many updates each: the stalled client's buffers fill, and its oldest
    // waiting frame waits past the stall limit.
    for (std::uint64_t seq = 2; seq <= 200; ++seq) {
        for (std::uint64_t match = 1; match <= 20; ++match) serve.publish(match, seq, 0.5);
    }
    REQUIRE(eventually([&] { return counter(gateway.port(), "clients_dropped_slow") == 1; }));
    // The healthy client, which reads, sees the last update of its match.
    // Read until that update (conflation may skip earlier ones); a long wait, since a loaded
    // machine under the thread sanitizer can pause the gateway for well over a second.
    std::string last;
    while (!has(last, R"("match_id":1,"update_seq":200,)")) {
        auto frame = healthy.receive_update(10000ms);
        if (!frame) break;
        last = *frame;
    }
    CHECK(has(last, R"("match_id":1,"update_seq":200,)"));

    // The stalled client reads what was already on its way, then the close frame.
    while (stalled.receive(2000ms)) {}
    CHECK(stalled.error() == websocket::error::closed);
    CHECK(stalled.close_code() == liveprob::gateway::kCloseSendQueueFull);
}

TEST_CASE("an origin outside the allow-list cannot open the feed", "[gateway][sockets]") {
    FakeServe serve;
    auto config = test_config(serve);
    config.allowed_origins = {"http://screens.example"};
    RunningGateway gateway(config);

    TestClient refused(gateway.port(), std::string("http://elsewhere.example"));
    CHECK(refused.handshake_error() == websocket::error::upgrade_declined);
    CHECK(refused.handshake_status() == 403);
    TestClient listed(gateway.port(), std::string("http://screens.example"));
    CHECK_FALSE(listed.handshake_error());
    // The page the gateway serves itself is always allowed.
    TestClient own(gateway.port(), fmt::format("http://127.0.0.1:{}", gateway.port()));
    CHECK_FALSE(own.handshake_error());
    CHECK(counter(gateway.port(), "origins_rejected") == 1);
}

TEST_CASE("a client message over the size limit closes the client with code 1009",
          "[gateway][sockets]") {
    FakeServe serve;
    auto config = test_config(serve);
    config.max_client_message_bytes = 256;
    RunningGateway gateway(config);
    TestClient client(gateway.port());
    // Nothing heard from serve yet: a new client is told so at once.
    CHECK(client.receive_containing(R"({"kind":"upstream","state":"waiting",)"));
    client.send(R"({"watch":[)" + std::string(300, '1') + "]}");
    CHECK_FALSE(client.receive());
    CHECK(client.error() == websocket::error::closed);
    CHECK(client.close_code() == liveprob::gateway::kCloseTooBig);
    CHECK(counter(gateway.port(), "clients_closed_oversize") == 1);
}

TEST_CASE("a client that answers nothing is cut off after the idle time-out",
          "[gateway][sockets]") {
    FakeServe serve;
    auto config = test_config(serve);
    config.idle_timeout = 400ms;
    RunningGateway gateway(config);
    TestClient silent(gateway.port());  // never reads, so never answers the gateway's pings
    REQUIRE_FALSE(silent.handshake_error());
    REQUIRE(eventually([&] { return counter(gateway.port(), "clients_idle_timeout") == 1; }));
    CHECK(counter(gateway.port(), "clients_open") == 0);
    CHECK_FALSE(
        silent.receive_update(1000ms));  // the upstream notice sent at connect, then the end
    CHECK(silent.error() != asio::error::timed_out);  // the gateway ended it
}

TEST_CASE("damaged, stale and out-of-sequence feed messages are counted, not forwarded",
          "[gateway][sockets]") {
    FakeServe serve;
    RunningGateway gateway(test_config(serve));
    wait_for_feed(serve, gateway.port(), 9);
    const std::vector<std::uint8_t> garbage{1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12};
    serve.publish_raw(9, garbage);
    serve.publish(9, 2, 0.5);
    serve.publish(9, 5, 0.5);  // 3 and 4 never came: a gap
    // One publisher, one subscriber: messages arrive in order. Once update 5 shows, everything
    // sent before it has been handled, including any extra copies of update 1 that
    // wait_for_feed sent (those are stale too), so the stale count is then settled.
    REQUIRE(eventually([&] {
        return has(http_get(gateway.port(), "/api/matches").body,
                   R"("match_id":9,"update_seq":5,)");
    }));
    const auto stale_before = counter(gateway.port(), "updates_stale");
    serve.publish(9, 4, 0.5);  // late: older than what the gateway holds
    REQUIRE(
        eventually([&] { return counter(gateway.port(), "updates_stale") == stale_before + 1; }));
    CHECK(counter(gateway.port(), "updates_rejected") == 1);
    CHECK(counter(gateway.port(), "update_gaps") == 1);
    CHECK(has(http_get(gateway.port(), "/api/matches").body, R"("match_id":9,"update_seq":5,)"));
}

TEST_CASE("plain HTTP serves the page, the match state and the timeline", "[gateway][sockets]") {
    FakeServe serve;
    RunningGateway gateway(test_config(serve));
    wait_for_feed(serve, gateway.port(), 4);
    serve.publish(4, 2, 0.5, 1);  // a goal

    const auto page = http_get(gateway.port(), "/");
    CHECK(page.status == 200);
    CHECK(has(page.body, "not advice"));
    CHECK(http_get(gateway.port(), "/app.js").status == 200);
    REQUIRE(eventually([&] {
        return has(http_get(gateway.port(), "/api/timeline?match=4").body, "],[2,2702000,0.5,");
    }));
    CHECK(has(
        http_get(gateway.port(), "/api/timeline?match=4").body,
        R"({"kind":"timeline","match_id":4,"points":[[2,2701000,0.5,0.25,0.25,0,0,0,0,null,null],[2,2702000,0.5,0.25,0.25,1,0,0,0,null,null]]})"));
    CHECK(http_get(gateway.port(), "/api/timeline?match=99").status == 404);
    CHECK(http_get(gateway.port(), "/../CMakeLists.txt").status == 404);
    CHECK(http_get(gateway.port(), "/api/matches", http::verb::post).status == 405);
    CHECK(http_get(gateway.port(), "/feed").status == 426);
}
