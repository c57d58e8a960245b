// `liveprob serve` (and optionally `liveprob gateway`) as separate processes on ephemeral
// ports, a feed sender (DEALER to serve's ingest, no acknowledgements) and a recorder of what serve
// published (SUB), for tests that check a client against what the engine really published.
#pragma once

#include <zmq.hpp>

#include <chrono>
#include <cstdint>
#include <filesystem>
#include <map>
#include <memory>
#include <string>
#include <thread>
#include <vector>

#include "child_process.hpp"
#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "test_env.hpp"

namespace liveprob::test {

class LiveStack {
public:
    // `tick_ms`: serve republishes live matches this often (large = a stable final state).
    // `serve_extra`: more of serve's options.
    explicit LiveStack(const std::filesystem::path& dir, std::uint32_t tick_ms = 3'600'000,
                       const std::vector<std::string>& serve_extra = {})
        : dir_(dir) {
        std::vector<std::string> argv{liveprob_binary().string(),
                                      "serve",
                                      "--ingest",
                                      "tcp://127.0.0.1:*",
                                      "--publish",
                                      "tcp://127.0.0.1:*",
                                      "--snapshot",
                                      "tcp://127.0.0.1:*",
                                      "--endpoints-file",
                                      (dir / "serve.endpoints").string(),
                                      "--tick-ms",
                                      std::to_string(tick_ms)};
        argv.insert(argv.end(), serve_extra.begin(), serve_extra.end());
        serve_ = std::make_unique<ChildProcess>(argv, dir / "serve.log");
        const std::string endpoints = wait_for_file(dir / "serve.endpoints");
        endpoints_ = endpoints;
        ingest_ = key_value(endpoints, "ingest");
        publish_ = key_value(endpoints, "publish");
        snapshot_ = key_value(endpoints, "snapshot");

        push_.set(zmq::sockopt::linger, 2000);
        push_.connect(ingest_);
        sub_.set(zmq::sockopt::subscribe, "match.");
        sub_.connect(publish_);
        std::this_thread::sleep_for(
            std::chrono::milliseconds(300));  // let the subscription reach serve
    }

    // Starts the gateway against this serve; returns its HTTP port.
    std::uint16_t start_gateway(const std::vector<std::string>& extra = {}) {
        std::vector<std::string> argv{liveprob_binary().string(),
                                      "gateway",
                                      "--serve-endpoints",
                                      (dir_ / "serve.endpoints").string(),
                                      "--port",
                                      "0",
                                      "--port-file",
                                      (dir_ / "gateway.port").string(),
                                      "--page-dir",
                                      (source_dir() / "adapters" / "gateway" / "web").string()};
        argv.insert(argv.end(), extra.begin(), extra.end());
        gateway_ = std::make_unique<ChildProcess>(argv, dir_ / "gateway.log");
        const auto port =
            static_cast<std::uint16_t>(std::stoi(wait_for_file(dir_ / "gateway.port")));
        // The gateway's subscription needs a moment to reach serve; updates published before
        // that would only reach it through its start-up snapshot.
        std::this_thread::sleep_for(std::chrono::milliseconds(500));
        return port;
    }

    void send(const core::InboundMessage& message) {
        const auto bytes = protocol::encode_feed_message(message);
        push_.send(zmq::buffer(bytes), zmq::send_flags::none);
    }

    // Reads what serve publishes until match `match_id` has an update reflecting feed message
    // `input_seq` (or time runs out); returns false on time-out.
    bool await_update(std::uint64_t match_id, std::uint64_t input_seq,
                      std::chrono::milliseconds limit = std::chrono::milliseconds(10000)) {
        const auto deadline = std::chrono::steady_clock::now() + limit;
        while (std::chrono::steady_clock::now() < deadline) {
            if (auto it = latest_.find(match_id);
                it != latest_.end() && it->second.meta.input_seq >= input_seq) {
                return true;
            }
            zmq::pollitem_t item{static_cast<void*>(sub_), 0, ZMQ_POLLIN, 0};
            zmq::poll(&item, 1, std::chrono::milliseconds(50));
            zmq::message_t part;
            while (sub_.recv(part, zmq::recv_flags::dontwait)) {
                if (part.more()) continue;  // the topic frame
                auto decoded = protocol::decode_update({part.data<std::uint8_t>(), part.size()});
                if (decoded.ok()) latest_[decoded.value->meta.match_id] = *decoded.value;
            }
        }
        return false;
    }

    // The last update of each match that serve published.
    const std::map<std::uint64_t, protocol::DecodedUpdate>& latest() const { return latest_; }

    const std::string& publish_endpoint() const { return publish_; }
    // serve's endpoints file ("key=value" lines, "health=" with --health-address).
    const std::string& serve_endpoints() const { return endpoints_; }
    ChildProcess& serve_process() { return *serve_; }
    const std::string& snapshot_endpoint() const { return snapshot_; }

private:
    std::filesystem::path dir_;
    std::unique_ptr<ChildProcess> serve_;
    std::unique_ptr<ChildProcess> gateway_;
    std::string ingest_, publish_, snapshot_, endpoints_;
    zmq::context_t context_{1};
    zmq::socket_t push_{context_, zmq::socket_type::dealer};
    zmq::socket_t sub_{context_, zmq::socket_type::sub};
    std::map<std::uint64_t, protocol::DecodedUpdate> latest_;
};

}  // namespace liveprob::test
