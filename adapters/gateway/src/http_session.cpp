#include "http_session.hpp"

#include <boost/beast/websocket/rfc6455.hpp>

#include "websocket_session.hpp"

namespace liveprob::gateway {

namespace beast = boost::beast;

namespace {
// Requests to the gateway are small GETs; anything bigger is not ours to read.
constexpr std::uint32_t kMaxRequestHeaderBytes = 8 * 1024;
constexpr std::uint64_t kMaxRequestBodyBytes = 4 * 1024;
}  // namespace

HttpSession::HttpSession(boost::asio::ip::tcp::socket socket, GatewayHub& hub)
    : stream_(std::move(socket)), hub_(hub) {}

void HttpSession::read_request() {
    parser_.emplace();
    parser_->header_limit(kMaxRequestHeaderBytes);
    parser_->body_limit(kMaxRequestBodyBytes);
    stream_.expires_after(hub_.config.handshake_timeout);
    http::async_read(
        stream_, buffer_, *parser_,
        [self = shared_from_this()](beast::error_code ec, std::size_t) { self->on_read(ec); });
}

void HttpSession::on_read(beast::error_code ec) {
    if (ec) {
        // end_of_stream: the client closed between requests. A time-out, an oversize or a
        // malformed request: drop the connection; there is nothing useful to answer.
        beast::error_code ignored;
        stream_.socket().shutdown(boost::asio::ip::tcp::socket::shutdown_both, ignored);
        return;
    }
    const HttpRequest& request = parser_->get();
    if (beast::websocket::is_upgrade(request)) return upgrade();
    send(answer_http(request, hub_));
}

void HttpSession::upgrade() {
    const HttpRequest& request = parser_->get();
    ++hub_.counters.http_requests;
    if (target_path(to_std(request.target())) != kFeedPath) {
        ++hub_.counters.http_not_found;
        return send(plain_response(request, http::status::not_found, "no WebSocket here"));
    }
    if (!origin_allowed(request, hub_.config)) {
        ++hub_.counters.origins_rejected;
        auto response = plain_response(request, http::status::forbidden, "origin not allowed");
        response.keep_alive(false);
        return send(std::move(response));
    }
    if (hub_.shutting_down) {
        return send(plain_response(request, http::status::service_unavailable, "shutting down"));
    }
    if (hub_.config.client_send_buffer_bytes > 0) {
        beast::error_code ignored;
        stream_.socket().set_option(
            boost::asio::socket_base::send_buffer_size(hub_.config.client_send_buffer_bytes),
            ignored);
    }
    std::make_shared<WebSocketSession>(std::move(stream_), hub_)->start(parser_->release());
}

void HttpSession::send(HttpResponse response) {
    response_ = std::make_shared<HttpResponse>(std::move(response));
    http::async_write(stream_, *response_,
                      [self = shared_from_this()](beast::error_code ec, std::size_t) {
                          if (ec) return;
                          if (!self->response_->keep_alive()) {
                              beast::error_code ignored;
                              self->stream_.socket().shutdown(
                                  boost::asio::ip::tcp::socket::shutdown_send, ignored);
                              return;
                          }
                          self->read_request();
                      });
}

}  // namespace liveprob::gateway
