#include "liveprob/monitoring/health_listener.hpp"

#include <fmt/format.h>
#include <boost/beast/core.hpp>
#include <boost/beast/http.hpp>

#include <charconv>
#include <chrono>
#include <memory>
#include <optional>
#include <stdexcept>

namespace liveprob::monitoring {

namespace asio = boost::asio;
namespace beast = boost::beast;
namespace http = beast::http;
using asio::ip::tcp;

namespace {

// A scraper sends a few hundred bytes; anything much larger is not one.
constexpr std::uint64_t kMaxRequestBytes = 16 * 1024;
constexpr auto kPeerDeadline = std::chrono::seconds(10);

class Connection : public std::enable_shared_from_this<Connection> {
public:
    Connection(tcp::socket socket, std::shared_ptr<const HttpHandler> handler)
        : stream_(std::move(socket)), handler_(std::move(handler)) {}

    void read_next() {
        parser_.emplace();
        parser_->body_limit(kMaxRequestBytes);
        parser_->header_limit(kMaxRequestBytes);
        stream_.expires_after(kPeerDeadline);
        http::async_read(
            stream_, buffer_, *parser_,
            [self = shared_from_this()](beast::error_code ec, std::size_t) { self->on_read(ec); });
    }

private:
    void on_read(beast::error_code ec) {
        if (ec) return close();  // peer gone, deadline passed or not HTTP: nothing to answer
        const auto& request = parser_->get();
        response_.emplace();
        response_->version(request.version());
        response_->keep_alive(request.keep_alive());
        if (request.method() != http::verb::get && request.method() != http::verb::head) {
            response_->result(http::status::method_not_allowed);
            response_->set(http::field::allow, "GET, HEAD");
            response_->set(http::field::content_type, "text/plain; charset=utf-8");
            response_->body() = "GET only\n";
        } else {
            const std::string_view target{request.target().data(), request.target().size()};
            HttpAnswer answer = (*handler_)(target.substr(0, target.find('?')));
            response_->result(static_cast<http::status>(answer.status));
            response_->set(http::field::content_type, answer.content_type);
            response_->set(http::field::cache_control, "no-store");
            response_->body() = std::move(answer.body);
        }
        response_->prepare_payload();
        if (request.method() == http::verb::head) response_->body().clear();
        http::async_write(stream_, *response_,
                          [self = shared_from_this()](beast::error_code write_ec, std::size_t) {
                              if (write_ec || !self->response_->keep_alive()) return self->close();
                              self->read_next();
                          });
    }

    void close() {
        beast::error_code ignored;
        stream_.socket().shutdown(tcp::socket::shutdown_both, ignored);
        stream_.close();
    }

    beast::tcp_stream stream_;
    std::shared_ptr<const HttpHandler> handler_;  // shared: a connection may outlive its listener
    beast::flat_buffer buffer_;
    std::optional<http::request_parser<http::string_body>> parser_;
    std::optional<http::response<http::string_body>> response_;
};

}  // namespace

tcp::endpoint parse_listen_address(const std::string& text) {
    const auto colon = text.rfind(':');
    if (colon == std::string::npos || colon == 0) {
        throw std::runtime_error(fmt::format("'{}' is not host:port", text));
    }
    std::string host = text.substr(0, colon);
    if (host.size() > 2 && host.front() == '[' && host.back() == ']') {
        host = host.substr(1, host.size() - 2);
    }
    const std::string port_text = text.substr(colon + 1);
    unsigned port = 0;
    const auto [end, error] =
        std::from_chars(port_text.data(), port_text.data() + port_text.size(), port);
    if (error != std::errc() || end != port_text.data() + port_text.size() || port > 65535 ||
        port_text.empty()) {
        throw std::runtime_error(fmt::format("'{}': port must be 0-65535", text));
    }
    boost::system::error_code ec;
    const auto address = asio::ip::make_address(host, ec);
    if (ec) throw std::runtime_error(fmt::format("'{}': '{}' is not an IP address", text, host));
    return {address, static_cast<std::uint16_t>(port)};
}

HealthListener::HealthListener(asio::io_context& io, const std::string& address,
                               HttpHandler handler)
    : acceptor_(io), handler_(std::make_shared<const HttpHandler>(std::move(handler))) {
    const tcp::endpoint where = parse_listen_address(address);
    boost::system::error_code ec;
    acceptor_.open(where.protocol(), ec);
    if (!ec) acceptor_.set_option(asio::socket_base::reuse_address(true), ec);
    if (!ec) acceptor_.bind(where, ec);
    if (!ec) acceptor_.listen(asio::socket_base::max_listen_connections, ec);
    if (ec) throw std::runtime_error(fmt::format("cannot listen on {}: {}", address, ec.message()));
}

void HealthListener::start() { accept_next(); }

void HealthListener::stop() {
    boost::system::error_code ignored;
    acceptor_.close(ignored);
}

std::uint16_t HealthListener::port() const { return acceptor_.local_endpoint().port(); }

void HealthListener::accept_next() {
    acceptor_.async_accept([this](boost::system::error_code ec, tcp::socket socket) {
        if (ec == asio::error::operation_aborted || !acceptor_.is_open()) return;
        if (!ec) std::make_shared<Connection>(std::move(socket), handler_)->read_next();
        accept_next();
    });
}

}  // namespace liveprob::monitoring
