// A small HTTP/1.1 listener for a process's operations endpoints (health, metrics): GET and
// HEAD only, one request at a time per connection, small requests, answers computed by the
// owner's handler on the owner's io_context thread (so the handler reads the owner's state
// without locks). A slow or silent peer is cut after a deadline; it never blocks the loop.
#pragma once

#include <boost/asio/io_context.hpp>
#include <boost/asio/ip/tcp.hpp>

#include <cstdint>
#include <functional>
#include <memory>
#include <string>
#include <string_view>

namespace liveprob::monitoring {

struct HttpAnswer {
    unsigned status = 200;
    std::string content_type = "text/plain; charset=utf-8";
    std::string body;
};

// The answer for a request path ("/metrics"; the query string is cut off).
using HttpHandler = std::function<HttpAnswer(std::string_view path)>;

class HealthListener {
public:
    // Listens on "host:port" (port 0: any free port); throws with the reason when it cannot.
    HealthListener(boost::asio::io_context& io, const std::string& address, HttpHandler handler);

    void start();
    void stop();
    // The port bound (useful with port 0).
    std::uint16_t port() const;

private:
    void accept_next();

    boost::asio::ip::tcp::acceptor acceptor_;
    std::shared_ptr<const HttpHandler> handler_;
};

// "127.0.0.1:9100" or "[::1]:0" -> the address and port; throws with the reason when not one.
boost::asio::ip::tcp::endpoint parse_listen_address(const std::string& text);

}  // namespace liveprob::monitoring
