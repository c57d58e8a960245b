// HTTP and WebSocket clients for tests over real sockets. Every operation has a deadline, so a
// broken or silent server fails the test instead of hanging it. Compiled once in
// web_clients.cpp: the HTTP and WebSocket library's headers stay out of the test files that
// only use the clients (each of them took a third of a minute to compile).
#pragma once

#include <boost/system/error_code.hpp>

#include <chrono>
#include <cstdint>
#include <memory>
#include <optional>
#include <string>

namespace liveprob::test {

struct HttpAnswer {
    unsigned status = 0;
    std::string content_type;
    std::string body;
};

// One request over a fresh connection to host:port (a numeric address), at most 5 s in all.
// `method`: an HTTP method name ("GET", "POST", ...). Throws when no answer comes.
HttpAnswer http_request(const std::string& host, std::uint16_t port, const std::string& target,
                        const std::string& method = "GET");

// "127.0.0.1:4567" form.
HttpAnswer http_request(const std::string& host_port, const std::string& target);

// A WebSocket client on 127.0.0.1 whose every operation runs for at most its limit.
// `target`: the path asked for (the gateway's /feed unless told).
class WebSocketClient {
public:
    explicit WebSocketClient(std::uint16_t port, std::optional<std::string> origin = std::nullopt,
                             int receive_buffer = 0, const std::string& target = "/feed");
    ~WebSocketClient();
    WebSocketClient(const WebSocketClient&) = delete;
    WebSocketClient& operator=(const WebSocketClient&) = delete;

    boost::system::error_code handshake_error() const;
    unsigned handshake_status() const;

    // Sends one text message (the test fails when it cannot be written in time).
    void send(const std::string& text);
    // The next text message, or nothing when the connection ends (see error()) or time runs out.
    std::optional<std::string> receive(
        std::chrono::milliseconds limit = std::chrono::milliseconds(5000));
    // The next update frame, skipping replies.
    std::optional<std::string> receive_update(
        std::chrono::milliseconds limit = std::chrono::milliseconds(5000));
    // The next message containing `part`, skipping the others; nothing when none comes within
    // `limit` in all.
    std::optional<std::string> receive_containing(
        const std::string& part, std::chrono::milliseconds limit = std::chrono::milliseconds(5000));
    boost::system::error_code error() const;
    std::uint16_t close_code() const;

private:
    struct Connection;
    std::unique_ptr<Connection> connection_;
};

}  // namespace liveprob::test
