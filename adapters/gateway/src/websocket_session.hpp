// Private to the gateway: one WebSocket client. It chooses matches with watch requests and
// receives their frames. A slow reader gets latest-value-wins conflation per match: while a
// frame for a match waits to be sent, a newer one replaces it, so its frames are bounded by
// the matches held. A client too far behind (its oldest frame waiting past the stall limit) or
// with too many replies waiting is closed with kCloseSendQueueFull: it cannot hold the gateway's
// memory hostage.
#pragma once

#include <boost/asio/steady_timer.hpp>
#include <boost/beast/core.hpp>
#include <boost/beast/websocket.hpp>

#include <chrono>
#include <cstdint>
#include <deque>
#include <memory>
#include <unordered_map>
#include <unordered_set>

#include "gateway_hub.hpp"
#include "http_routes.hpp"

namespace liveprob::gateway {

class WebSocketSession : public std::enable_shared_from_this<WebSocketSession> {
public:
    WebSocketSession(boost::beast::tcp_stream stream, GatewayHub& hub);
    ~WebSocketSession();

    // Completes the upgrade that `request` asked for, then serves the client.
    void start(HttpRequest request);

    // A new frame for `match_id`, read off the feed at `arrived_us` (wall clock; 0: not a fresh
    // update, not timed); queued only when this client watches the match.
    void offer(std::uint64_t match_id, const Frame& frame, std::int64_t arrived_us = 0);
    // A message for every client whatever it watches (the upstream state).
    void notify(std::string text);
    // Closes with "going away" (gateway shutdown).
    void close_going_away();
    // Closes the client when something has waited for it longer than the stall limit.
    void check_behind(std::chrono::steady_clock::time_point now);

private:
    void on_accept(boost::beast::error_code ec);
    void read_next();
    void on_read(boost::beast::error_code ec);
    void handle_request(std::string_view text);
    void queue_reply(std::string text);
    bool watches(std::uint64_t match_id) const;
    bool over_cap();
    void write_next();
    void on_write(boost::beast::error_code ec);
    void begin_close(std::uint16_t code, const char* reason);
    void send_close();
    void finish();

    boost::beast::websocket::stream<boost::beast::tcp_stream> ws_;
    GatewayHub& hub_;
    boost::beast::flat_buffer read_buffer_;
    boost::asio::steady_timer close_deadline_;

    bool watch_all_ = false;
    std::unordered_set<std::uint64_t> watched_;

    std::deque<Frame> replies_;  // answers to the client's requests
    struct Pending {
        Frame frame;
        std::int64_t arrived_us = 0;  // when the gateway read it off the feed (0: not timed)
        std::chrono::steady_clock::time_point queued_at;  // kept when a newer frame replaces it
    };
    std::deque<std::uint64_t> pending_order_;  // matches with a frame waiting, oldest first
    std::unordered_map<std::uint64_t, Pending> pending_;  // latest waiting frame per match
    Frame in_flight_;                                     // kept alive while Beast writes it
    std::int64_t in_flight_arrived_us_ = 0;
    std::chrono::steady_clock::time_point write_started_;
    std::string peer_;        // "address:port", for the log
    std::string end_reason_;  // why the connection ended, for the log

    bool open_ = false;  // handshake done, registered with the hub
    bool writing_ = false;
    bool closing_ = false;  // no more frames; a close frame is due or sent
    bool finished_ = false;
    std::uint16_t close_code_ = 0;
    const char* close_reason_ = "";
};

}  // namespace liveprob::gateway
