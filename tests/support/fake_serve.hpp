// For gateway tests over real sockets: a ZeroMQ publisher in the test that plays `serve`, and
// the gateway on its own thread.
#pragma once

#include <fmt/format.h>
#include <catch2/catch.hpp>
#include <zmq.hpp>

#include <chrono>
#include <cstdint>
#include <functional>
#include <span>
#include <stdexcept>
#include <string>
#include <thread>

#include "liveprob/gateway/gateway.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/transport/topics.hpp"
#include "test_env.hpp"
#include "web_clients.hpp"

namespace liveprob::test {

// Plays the engine's publish socket.
class FakeServe {
public:
    FakeServe() : socket_(context_, zmq::socket_type::pub) {
        socket_.set(zmq::sockopt::linger, 0);
        socket_.set(zmq::sockopt::sndhwm, 0);  // never drop in the test itself
        socket_.bind("tcp://127.0.0.1:*");
        endpoint_ = socket_.get(zmq::sockopt::last_endpoint);
    }
    const std::string& endpoint() const { return endpoint_; }

    void publish(std::uint64_t match_id, std::uint64_t seq, double p_home,
                 std::uint16_t home_goals = 0,
                 core::MatchStatus status = core::MatchStatus::in_play) {
        protocol::UpdateMeta meta;
        meta.match_id = match_id;
        meta.output_seq = seq;
        meta.input_seq = seq;
        meta.publish_time_us = 1'700'000'000'000'000;
        core::Outputs o;
        o.status = status;
        o.clock = {core::Period::second_half, static_cast<std::uint32_t>(2'700'000 + seq * 1000)};
        o.home_goals = home_goals;
        o.p_home = p_home;
        o.p_draw = (1.0 - p_home) * 0.5;
        o.p_away = 1.0 - p_home - o.p_draw;
        o.next_goal_home = 0.4;
        o.next_goal_away = 0.3;
        o.next_goal_none = 0.3;
        o.goals_added[0][0] = 1.0;
        publish_raw(match_id, encoder_.encode(meta, o));
    }
    void publish_raw(std::uint64_t match_id, std::span<const std::uint8_t> bytes) {
        const std::string topic = transport::match_topic_string(match_id);
        socket_.send(zmq::buffer(topic), zmq::send_flags::sndmore);
        socket_.send(zmq::buffer(bytes.data(), bytes.size()), zmq::send_flags::none);
    }

private:
    zmq::context_t context_{1};
    zmq::socket_t socket_;
    std::string endpoint_;
    protocol::UpdateEncoder encoder_;
};

// A gateway on its own thread, stopped and joined on scope exit.
class RunningGateway {
public:
    explicit RunningGateway(gateway::GatewayConfig config)
        : gateway_(std::move(config)), thread_([this] { gateway_.run(); }) {}
    ~RunningGateway() {
        gateway_.stop();
        thread_.join();
    }
    RunningGateway(const RunningGateway&) = delete;
    RunningGateway& operator=(const RunningGateway&) = delete;
    std::uint16_t port() const { return gateway_.port(); }

private:
    gateway::Gateway gateway_;
    std::thread thread_;
};

// A gateway subscribed to `serve`, with the source tree's page and short time-outs.
inline gateway::GatewayConfig test_config(const FakeServe& serve) {
    gateway::GatewayConfig c;
    c.feed_endpoint = serve.endpoint();
    c.web_dir = source_dir() / "adapters" / "gateway" / "web";
    c.idle_timeout = std::chrono::seconds(5);
    c.handshake_timeout = std::chrono::seconds(2);
    return c;
}

// Polls `condition` until it holds or `limit` passes; its last answer.
inline bool eventually(const std::function<bool()>& condition,
                       std::chrono::milliseconds limit = std::chrono::milliseconds(5000),
                       std::chrono::milliseconds pause = std::chrono::milliseconds(20)) {
    const auto deadline = std::chrono::steady_clock::now() + limit;
    while (std::chrono::steady_clock::now() < deadline) {
        if (condition()) return true;
        std::this_thread::sleep_for(pause);
    }
    return condition();
}

// The counter `name` from the gateway's GET /api/gateway (its JSON is flat: "name":number).
inline std::uint64_t gateway_counter(std::uint16_t port, const std::string& name) {
    const std::string body = http_request("127.0.0.1", port, "/api/gateway").body;
    const auto at = body.find("\"" + name + "\":");
    if (at == std::string::npos) throw std::runtime_error("no counter " + name + " in " + body);
    return std::stoull(body.substr(at + name.size() + 3));
}

// ZeroMQ subscriptions take a moment to reach the publisher: publishes a first update of match
// `match_id` until the gateway has it.
inline void wait_for_feed(FakeServe& serve, std::uint16_t port, std::uint64_t match_id) {
    REQUIRE(eventually([&] {
        serve.publish(match_id, 1, 0.5);
        return http_request("127.0.0.1", port, "/api/matches")
                   .body.find(fmt::format("\"match_id\":{},", match_id)) != std::string::npos;
    }));
}

}  // namespace liveprob::test
