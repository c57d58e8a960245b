// HTTP and WebSocket clients for tests over real sockets. Every operation has a deadline, so a
// broken or silent server fails the test instead of hanging it.
#pragma once

#include <catch2/catch.hpp>

#include <fmt/format.h>
#include <boost/asio/io_context.hpp>
#include <boost/asio/ip/tcp.hpp>
#include <boost/beast/core.hpp>
#include <boost/beast/http.hpp>
#include <boost/beast/websocket.hpp>

#include <chrono>
#include <cstdint>
#include <optional>
#include <stdexcept>
#include <string>

namespace liveprob::test {

struct HttpAnswer {
    unsigned status = 0;
    std::string content_type;
    std::string body;
};

// One request over a fresh connection to host:port (a numeric address), at most 5 s in all.
inline HttpAnswer http_request(const std::string& host, std::uint16_t port,
                               const std::string& target,
                               boost::beast::http::verb verb = boost::beast::http::verb::get) {
    namespace beast = boost::beast;
    namespace http = beast::http;
    boost::asio::io_context io;
    beast::tcp_stream stream(io);
    std::optional<HttpAnswer> answer;
    beast::error_code failure;
    http::request<http::string_body> request{verb, target, 11};
    request.set(http::field::host, fmt::format("{}:{}", host, port));
    request.keep_alive(false);
    beast::flat_buffer buffer;
    http::response<http::string_body> response;
    // Asynchronous, so the stream's expiry applies to every step (blocking calls ignore it).
    stream.expires_after(std::chrono::seconds(5));
    stream.async_connect(
        boost::asio::ip::tcp::endpoint(boost::asio::ip::make_address(host), port),
        [&](beast::error_code connected) {
            if (connected) return void(failure = connected);
            http::async_write(stream, request, [&](beast::error_code written, std::size_t) {
                if (written) return void(failure = written);
                http::async_read(
                    stream, buffer, response, [&](beast::error_code read, std::size_t) {
                        if (read) return void(failure = read);
                        answer = HttpAnswer{response.result_int(),
                                            std::string(response[http::field::content_type]),
                                            response.body()};
                    });
            });
        });
    io.run();
    if (!answer) {
        throw std::runtime_error(
            fmt::format("GET {}:{}{} failed: {}", host, port, target, failure.message()));
    }
    return *answer;
}

// "127.0.0.1:4567" form.
inline HttpAnswer http_request(const std::string& host_port, const std::string& target) {
    const auto colon = host_port.rfind(':');
    return http_request(host_port.substr(0, colon),
                        static_cast<std::uint16_t>(std::stoi(host_port.substr(colon + 1))), target);
}

// A WebSocket client on 127.0.0.1 whose every operation runs for at most its limit (run_for).
// `target`: the path asked for (the gateway's /feed unless told).
class WebSocketClient {
public:
    explicit WebSocketClient(std::uint16_t port, std::optional<std::string> origin = std::nullopt,
                             int receive_buffer = 0, const std::string& target = "/feed")
        : ws_(io_) {
        namespace http = boost::beast::http;
        auto& socket = boost::beast::get_lowest_layer(ws_).socket();
        socket.open(boost::asio::ip::tcp::v4());
        if (receive_buffer > 0)
            socket.set_option(boost::asio::socket_base::receive_buffer_size(receive_buffer));
        socket.connect(
            boost::asio::ip::tcp::endpoint(boost::asio::ip::make_address("127.0.0.1"), port));
        ws_.set_option(boost::beast::websocket::stream_base::decorator(
            [origin](boost::beast::websocket::request_type& r) {
                if (origin) r.set(http::field::origin, *origin);
            }));
        handshake_error_ = run([&](auto done) {
            ws_.async_handshake(response_, fmt::format("127.0.0.1:{}", port), target, done);
        });
    }
    boost::beast::error_code handshake_error() const { return handshake_error_; }
    unsigned handshake_status() const { return response_.result_int(); }

    // Sends one text message (the test fails when it cannot be written in time).
    void send(const std::string& text) {
        const auto ec = run([&](auto done) {
            ws_.async_write(boost::asio::buffer(text),
                            [done](boost::beast::error_code e, std::size_t) { done(e); });
        });
        REQUIRE_FALSE(ec);
    }
    // The next text message, or nothing when the connection ends (see error()) or time runs out.
    std::optional<std::string> receive(
        std::chrono::milliseconds limit = std::chrono::milliseconds(5000)) {
        boost::beast::flat_buffer buffer;
        error_ = run(
            [&](auto done) {
                ws_.async_read(buffer,
                               [done](boost::beast::error_code e, std::size_t) { done(e); });
            },
            limit);
        if (error_) return std::nullopt;
        return boost::beast::buffers_to_string(buffer.data());
    }
    // The next update frame, skipping replies.
    std::optional<std::string> receive_update(
        std::chrono::milliseconds limit = std::chrono::milliseconds(5000)) {
        return receive_containing(R"("kind":"update")", limit);
    }
    // The next message containing `part`, skipping the others; nothing when none comes within
    // `limit` in all.
    std::optional<std::string> receive_containing(
        const std::string& part,
        std::chrono::milliseconds limit = std::chrono::milliseconds(5000)) {
        const auto deadline = std::chrono::steady_clock::now() + limit;
        for (;;) {
            const auto left = std::chrono::duration_cast<std::chrono::milliseconds>(
                deadline - std::chrono::steady_clock::now());
            if (left.count() <= 0) return std::nullopt;
            auto message = receive(left);
            if (!message || message->find(part) != std::string::npos) return message;
        }
    }
    boost::beast::error_code error() const { return error_; }
    std::uint16_t close_code() const { return static_cast<std::uint16_t>(ws_.reason().code); }

private:
    template <class Start>
    boost::beast::error_code run(
        Start start, std::chrono::milliseconds limit = std::chrono::milliseconds(5000)) {
        std::optional<boost::beast::error_code> result;
        start([&result](boost::beast::error_code ec) { result = ec; });
        io_.restart();
        const auto deadline = std::chrono::steady_clock::now() + limit;
        while (!result && std::chrono::steady_clock::now() < deadline)
            io_.run_for(std::chrono::milliseconds(20));
        if (!result) {
            boost::beast::get_lowest_layer(ws_).close();  // abandons the operation
            io_.restart();
            io_.run_for(std::chrono::seconds(1));
            return boost::asio::error::timed_out;
        }
        return *result;
    }

    boost::asio::io_context io_;
    boost::beast::websocket::stream<boost::beast::tcp_stream> ws_;
    boost::beast::websocket::response_type response_;
    boost::beast::error_code handshake_error_;
    boost::beast::error_code error_;
};

}  // namespace liveprob::test
