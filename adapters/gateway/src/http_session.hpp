// Private to the gateway: one accepted TCP connection while it speaks plain HTTP. It answers
// requests (keep-alive) until one asks for a WebSocket upgrade on the feed path, which it
// hands, with the socket, to a WebSocketSession.
#pragma once

#include <boost/asio/ip/tcp.hpp>
#include <boost/beast/core.hpp>
#include <boost/beast/http.hpp>

#include <memory>
#include <optional>

#include "gateway_hub.hpp"
#include "http_routes.hpp"

namespace liveprob::gateway {

class HttpSession : public std::enable_shared_from_this<HttpSession> {
public:
    HttpSession(boost::asio::ip::tcp::socket socket, GatewayHub& hub);
    void start() { read_request(); }

private:
    void read_request();
    void on_read(boost::beast::error_code ec);
    void upgrade();
    void send(HttpResponse response);

    boost::beast::tcp_stream stream_;
    GatewayHub& hub_;
    boost::beast::flat_buffer buffer_;
    std::optional<http::request_parser<http::string_body>> parser_;
    std::shared_ptr<HttpResponse> response_;
};

}  // namespace liveprob::gateway
