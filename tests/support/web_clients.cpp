// The test clients of web_clients.hpp over Boost.Beast.
#include "web_clients.hpp"

#include <catch2/catch.hpp>

#include <fmt/format.h>
#include <boost/asio/io_context.hpp>
#include <boost/asio/ip/tcp.hpp>
#include <boost/beast/core.hpp>
#include <boost/beast/http.hpp>
#include <boost/beast/websocket.hpp>

#include <stdexcept>

namespace liveprob::test {

namespace beast = boost::beast;
namespace http = beast::http;

HttpAnswer http_request(const std::string& host, std::uint16_t port, const std::string& target,
                        const std::string& method) {
    boost::asio::io_context io;
    beast::tcp_stream stream(io);
    std::optional<HttpAnswer> answer;
    beast::error_code failure;
    const http::verb verb = http::string_to_verb(method);
    if (verb == http::verb::unknown)
        throw std::invalid_argument(fmt::format("'{}' is not an HTTP method", method));
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
            fmt::format("{} {}:{}{} failed: {}", method, host, port, target, failure.message()));
    }
    return *answer;
}

HttpAnswer http_request(const std::string& host_port, const std::string& target) {
    const auto colon = host_port.rfind(':');
    return http_request(host_port.substr(0, colon),
                        static_cast<std::uint16_t>(std::stoi(host_port.substr(colon + 1))), target);
}

struct WebSocketClient::Connection {
    boost::asio::io_context io;
    beast::websocket::stream<beast::tcp_stream> ws{io};
    beast::websocket::response_type response;
    beast::error_code handshake_error;
    beast::error_code error;

    // Runs one asynchronous operation for at most `limit`; on time-out the connection is closed
    // (which abandons the operation) and timed_out returned.
    template <class Start>
    beast::error_code run(Start start,
                          std::chrono::milliseconds limit = std::chrono::milliseconds(5000)) {
        std::optional<beast::error_code> result;
        start([&result](beast::error_code ec) { result = ec; });
        io.restart();
        const auto deadline = std::chrono::steady_clock::now() + limit;
        while (!result && std::chrono::steady_clock::now() < deadline)
            io.run_for(std::chrono::milliseconds(20));
        if (!result) {
            beast::get_lowest_layer(ws).close();
            io.restart();
            io.run_for(std::chrono::seconds(1));
            return boost::asio::error::timed_out;
        }
        return *result;
    }
};

WebSocketClient::WebSocketClient(std::uint16_t port, std::optional<std::string> origin,
                                 int receive_buffer, const std::string& target)
    : connection_(std::make_unique<Connection>()) {
    auto& c = *connection_;
    auto& socket = beast::get_lowest_layer(c.ws).socket();
    socket.open(boost::asio::ip::tcp::v4());
    if (receive_buffer > 0)
        socket.set_option(boost::asio::socket_base::receive_buffer_size(receive_buffer));
    socket.connect(
        boost::asio::ip::tcp::endpoint(boost::asio::ip::make_address("127.0.0.1"), port));
    c.ws.set_option(
        beast::websocket::stream_base::decorator([origin](beast::websocket::request_type& r) {
            if (origin) r.set(http::field::origin, *origin);
        }));
    c.handshake_error = c.run([&](auto done) {
        c.ws.async_handshake(c.response, fmt::format("127.0.0.1:{}", port), target, done);
    });
}

WebSocketClient::~WebSocketClient() = default;

boost::system::error_code WebSocketClient::handshake_error() const {
    return connection_->handshake_error;
}

unsigned WebSocketClient::handshake_status() const { return connection_->response.result_int(); }

void WebSocketClient::send(const std::string& text) {
    auto& c = *connection_;
    const auto ec = c.run([&](auto done) {
        c.ws.async_write(boost::asio::buffer(text),
                         [done](beast::error_code e, std::size_t) { done(e); });
    });
    REQUIRE_FALSE(ec);
}

std::optional<std::string> WebSocketClient::receive(std::chrono::milliseconds limit) {
    auto& c = *connection_;
    beast::flat_buffer buffer;
    c.error = c.run(
        [&](auto done) {
            c.ws.async_read(buffer, [done](beast::error_code e, std::size_t) { done(e); });
        },
        limit);
    if (c.error) return std::nullopt;
    return beast::buffers_to_string(buffer.data());
}

std::optional<std::string> WebSocketClient::receive_update(std::chrono::milliseconds limit) {
    return receive_containing(R"("kind":"update")", limit);
}

std::optional<std::string> WebSocketClient::receive_containing(const std::string& part,
                                                               std::chrono::milliseconds limit) {
    const auto deadline = std::chrono::steady_clock::now() + limit;
    for (;;) {
        const auto left = std::chrono::duration_cast<std::chrono::milliseconds>(
            deadline - std::chrono::steady_clock::now());
        if (left.count() <= 0) return std::nullopt;
        auto message = receive(left);
        if (!message || message->find(part) != std::string::npos) return message;
    }
}

boost::system::error_code WebSocketClient::error() const { return connection_->error; }

std::uint16_t WebSocketClient::close_code() const {
    return static_cast<std::uint16_t>(connection_->ws.reason().code);
}

}  // namespace liveprob::test
