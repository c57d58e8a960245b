#include "websocket_session.hpp"

#include <fmt/format.h>
#include <spdlog/spdlog.h>
#include <boost/asio/buffer.hpp>

#include <algorithm>
#include <optional>
#include <variant>
#include <vector>

#include "liveprob/gateway/client_request.hpp"
#include "liveprob/protocol/json_writer.hpp"
#include "liveprob/system/wall_clock.hpp"

namespace liveprob::gateway {

namespace beast = boost::beast;
namespace websocket = beast::websocket;

WebSocketSession::WebSocketSession(beast::tcp_stream stream, GatewayHub& hub)
    : ws_(std::move(stream)), hub_(hub), close_deadline_(ws_.get_executor()) {}

WebSocketSession::~WebSocketSession() { hub_.clients.erase(this); }

void WebSocketSession::start(HttpRequest request) {
    beast::error_code no_peer;
    const auto remote = beast::get_lowest_layer(ws_).socket().remote_endpoint(no_peer);
    peer_ = no_peer ? "unknown peer"
                    : fmt::format("{}:{}", remote.address().to_string(), remote.port());
    beast::get_lowest_layer(ws_).expires_never();  // the WebSocket timeouts take over
    // Pings go out at half the idle time; a client that answers nothing at all by the full
    // idle time is dead or stalled and is cut off.
    ws_.set_option(websocket::stream_base::timeout{hub_.config.handshake_timeout,
                                                   hub_.config.idle_timeout, true});
    ws_.read_message_max(hub_.config.max_client_message_bytes);
    ws_.set_option(websocket::stream_base::decorator([](websocket::response_type& response) {
        response.set(beast::http::field::server, "liveprob-gateway");
    }));
    ws_.async_accept(request,
                     [self = shared_from_this()](beast::error_code ec) { self->on_accept(ec); });
}

void WebSocketSession::on_accept(beast::error_code ec) {
    if (ec) {
        end_reason_ = "handshake failed: " + ec.message();
        return finish();
    }
    if (hub_.shutting_down) return begin_close(kCloseShuttingDown, "gateway shutting down");
    open_ = true;
    hub_.clients.insert(this);
    ++hub_.counters.clients_opened;
    spdlog::info("gateway: client {} connected ({} open)", peer_, hub_.clients.size());
    // Told at once when serve is not heard, so a new page never shows a dead feed as live.
    if (hub_.upstream != Upstream::live)
        queue_reply(hub_.render_upstream_json(std::chrono::steady_clock::now()));
    read_next();
}

void WebSocketSession::read_next() {
    ws_.async_read(read_buffer_, [self = shared_from_this()](beast::error_code ec, std::size_t) {
        self->on_read(ec);
    });
}

void WebSocketSession::on_read(beast::error_code ec) {
    if (ec) {
        // Beast has already sent close code 1009 for an oversize message.
        if (ec == websocket::error::message_too_big) ++hub_.counters.clients_closed_oversize;
        if (ec == beast::error::timeout) ++hub_.counters.clients_idle_timeout;
        if (end_reason_.empty()) {
            end_reason_ = ec == websocket::error::closed            ? "closed by the client"
                          : ec == beast::error::timeout             ? "idle timeout (no pong)"
                          : ec == websocket::error::message_too_big ? "message too big"
                                                                    : ec.message();
        }
        return finish();
    }
    const std::string text = beast::buffers_to_string(read_buffer_.data());
    read_buffer_.consume(read_buffer_.size());
    if (!closing_) handle_request(text);
    read_next();  // also how the peer's answer to our close frame arrives
}

void WebSocketSession::handle_request(std::string_view text) {
    auto parsed = parse_client_request(text);
    if (auto* error = std::get_if<RequestError>(&parsed)) {
        ++hub_.counters.bad_requests;
        std::string reply;
        protocol::JsonWriter(reply)
            .begin_object()
            .member("kind", "error")
            .member("reason", error->reason)
            .end_object();
        return queue_reply(std::move(reply));
    }
    const auto& request = std::get<WatchRequest>(parsed);
    std::vector<std::uint64_t> newly_watched;
    if (request.watch) {
        if (request.all && !watch_all_) {
            watch_all_ = true;
            for (const auto& [id, frame] : hub_.latest.all_latest()) newly_watched.push_back(id);
        }
        for (std::uint64_t id : request.match_ids) {
            if (watched_.insert(id).second) newly_watched.push_back(id);
        }
    } else {
        if (request.all) {
            watch_all_ = false;
            watched_.clear();
        }
        for (std::uint64_t id : request.match_ids) watched_.erase(id);
        // Frames of matches no longer watched are not sent.
        std::erase_if(pending_order_, [&](std::uint64_t id) {
            if (watches(id)) return false;
            pending_.erase(id);
            return true;
        });
    }

    std::vector<std::uint64_t> listed(watched_.begin(), watched_.end());
    std::sort(listed.begin(), listed.end());
    std::string reply;
    protocol::JsonWriter json(reply);
    json.begin_object()
        .member("kind", "watching")
        .member("all", watch_all_)
        .key("match_ids")
        .begin_array();
    for (const std::uint64_t id : listed) json.value(id);
    json.end_array().end_object();
    queue_reply(std::move(reply));
    // A late joiner gets the latest state of each newly watched match straight away.
    for (std::uint64_t id : newly_watched) {
        if (Frame frame = hub_.latest.latest(id)) offer(id, frame);
    }
}

bool WebSocketSession::watches(std::uint64_t match_id) const {
    return watch_all_ || watched_.count(match_id) != 0;
}

void WebSocketSession::queue_reply(std::string text) {
    if (closing_) return;
    replies_.push_back(std::make_shared<const std::string>(std::move(text)));
    if (over_cap()) return;
    write_next();
}

void WebSocketSession::notify(std::string text) {
    if (!open_) return;
    queue_reply(std::move(text));
}

void WebSocketSession::offer(std::uint64_t match_id, const Frame& frame, std::int64_t arrived_us) {
    if (!open_ || closing_ || !watches(match_id)) return;
    if (auto waiting = pending_.find(match_id); waiting != pending_.end()) {
        // Latest value wins; its place in the queue (and the time it took it) is kept.
        waiting->second.frame = frame;
        waiting->second.arrived_us = arrived_us;
        ++hub_.counters.frames_conflated;
        return;
    }
    pending_.emplace(match_id, Pending{frame, arrived_us, std::chrono::steady_clock::now()});
    pending_order_.push_back(match_id);
    if (over_cap()) return;
    write_next();
}

bool WebSocketSession::over_cap() {
    if (replies_.size() <= hub_.config.send_queue_cap) return false;
    ++hub_.counters.clients_dropped_slow;
    begin_close(kCloseSendQueueFull, "send queue full");
    return true;
}

void WebSocketSession::check_behind(std::chrono::steady_clock::time_point now) {
    if (!open_ || closing_) return;
    std::optional<std::chrono::steady_clock::time_point> oldest;
    if (writing_) oldest = write_started_;
    if (!pending_order_.empty()) {
        const auto queued = pending_.at(pending_order_.front()).queued_at;
        if (!oldest || queued < *oldest) oldest = queued;
    }
    if (!oldest || now - *oldest <= hub_.config.send_stall_limit) return;
    ++hub_.counters.clients_dropped_slow;
    begin_close(kCloseSendQueueFull, "too far behind");
}

void WebSocketSession::write_next() {
    if (writing_ || closing_) return;
    if (!replies_.empty()) {
        in_flight_ = std::move(replies_.front());
        in_flight_arrived_us_ = 0;
        replies_.pop_front();
    } else if (!pending_order_.empty()) {
        const std::uint64_t id = pending_order_.front();
        pending_order_.pop_front();
        auto waiting = pending_.find(id);
        in_flight_ = std::move(waiting->second.frame);
        in_flight_arrived_us_ = waiting->second.arrived_us;
        pending_.erase(waiting);
    } else {
        return;
    }
    writing_ = true;
    write_started_ = std::chrono::steady_clock::now();
    ws_.text(true);
    ws_.async_write(
        boost::asio::buffer(*in_flight_),
        [self = shared_from_this()](beast::error_code ec, std::size_t) { self->on_write(ec); });
}

void WebSocketSession::on_write(beast::error_code ec) {
    writing_ = false;
    in_flight_.reset();
    if (ec) {
        if (end_reason_.empty()) end_reason_ = "write failed: " + ec.message();
        return finish();
    }
    ++hub_.counters.frames_sent;
    if (in_flight_arrived_us_ != 0) {
        hub_.delivery.observe_us(system::wall_clock_us() - in_flight_arrived_us_);
    }
    if (closing_) return send_close();
    write_next();
}

void WebSocketSession::begin_close(std::uint16_t code, const char* reason) {
    if (closing_ || finished_) return;
    closing_ = true;
    close_code_ = code;
    close_reason_ = reason;
    if (end_reason_.empty())
        end_reason_ = fmt::format("closed by the gateway ({} {})", code, reason);
    replies_.clear();
    pending_.clear();
    pending_order_.clear();
    // A client that does not read will never take our close frame: cut the connection after
    // the handshake time-out rather than wait for it.
    close_deadline_.expires_after(hub_.config.handshake_timeout);
    close_deadline_.async_wait([self = shared_from_this()](beast::error_code ec) {
        if (!ec) self->finish();
    });
    if (!writing_) send_close();  // else on_write sends it once the frame in flight is out
}

void WebSocketSession::send_close() {
    websocket::close_reason reason;
    reason.code = close_code_;
    reason.reason = close_reason_;
    ws_.async_close(reason, [self = shared_from_this()](beast::error_code) {
        // The read loop sees the end of the connection and finishes.
    });
}

void WebSocketSession::finish() {
    if (finished_) return;
    finished_ = true;
    if (end_reason_.empty()) end_reason_ = "connection ended";
    spdlog::info("gateway: client {} dropped: {}", peer_, end_reason_);
    open_ = false;
    hub_.clients.erase(this);
    close_deadline_.cancel();
    beast::error_code ignored;
    beast::get_lowest_layer(ws_).socket().shutdown(boost::asio::socket_base::shutdown_both,
                                                   ignored);
    beast::get_lowest_layer(ws_).socket().close(ignored);
}

void WebSocketSession::close_going_away() {
    begin_close(kCloseShuttingDown, "gateway shutting down");
}

}  // namespace liveprob::gateway
