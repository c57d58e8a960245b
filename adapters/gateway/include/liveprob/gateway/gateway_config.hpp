// Settings of the WebSocket/HTTP gateway (`liveprob gateway`). Defaults suit a public screen
// behind a reverse proxy; tests shrink the limits to provoke each protection quickly.
#pragma once

#include <chrono>
#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <string>
#include <vector>

namespace liveprob::gateway {

struct GatewayConfig {
    // The `serve` publish endpoint to subscribe to, e.g. "tcp://127.0.0.1:5601".
    std::string feed_endpoint;
    // Optional `serve` snapshot endpoint: asked for every live match at start and whenever an
    // update sequence gap shows that something was missed.
    std::string snapshot_endpoint;
    // Instead of serve: `nats://host:port` URLs of a NATS cluster whose engines (`serve
    // --cluster`) publish on the match subjects; the gateway subscribes to all of them and, at
    // start, reads the latest-state bucket for the matches already under way (docs/cluster.md).
    std::vector<std::string> nats_servers;

    std::string listen_address = "127.0.0.1";
    std::uint16_t listen_port = 0;  // 0 = an ephemeral port (see Gateway::port())

    // Folder holding the page (index.html, app.js, style.css); loaded once at start.
    std::filesystem::path web_dir;

    // Browser origins allowed to open a WebSocket ("http://host:port"). The page's own origin
    // (the Host header) is always allowed; a request without Origin is not from a browser and
    // is allowed (common practice: Origin protects browsers, not other programs).
    std::vector<std::string> allowed_origins;

    // Largest message a client may send us; a bigger one closes it with code 1009.
    std::size_t max_client_message_bytes = 4096;
    // Replies waiting for one client (answers to its requests, notices); one more closes it
    // with code kCloseSendQueueFull. Update frames do not count: conflation keeps at most one
    // per match waiting, so however many matches a client watches (live or finished), their
    // frames are bounded by the matches held; what tells a slow client is send_stall_limit.
    std::size_t send_queue_cap = 256;
    // A client whose oldest waiting frame (or the frame being written) has waited this long is
    // too far behind: closed with kCloseSendQueueFull. Time, not a count of frames, so a burst
    // (every live match ticking at once, the catch-up of a new watch-all client) never drops a
    // client that reads.
    std::chrono::milliseconds send_stall_limit{15'000};
    // A finished or abandoned match is forgotten (its frame, its timeline, its place in
    // /api/matches and in a new watch-all client's catch-up) this long after its final update;
    // 0: never. The default matches serve's retention_s.
    std::chrono::milliseconds finished_retention{600'000};
    // A WebSocket client that neither sends nor answers our pings for this long is cut off.
    std::chrono::milliseconds idle_timeout{60'000};
    // HTTP requests and WebSocket handshakes must complete within this.
    std::chrono::milliseconds handshake_timeout{10'000};
    // Kernel send buffer per client socket (0 = the system default); small values make a slow
    // reader visible sooner.
    int client_send_buffer_bytes = 0;
    // Points kept per match for the timeline chart (older points are thinned, never the
    // latest, so memory stays bounded for any match length).
    std::size_t timeline_points = 720;
    // Nothing from serve (no update, no counters message) for this long: the upstream is lost,
    // every match is shown stale and /health/ready answers 503. serve sends its counters every
    // counters_interval_ms (default 5000) even when no match changes: the default limit is two
    // of those missed plus slack. Keep it above serve's interval.
    std::chrono::milliseconds upstream_silence_limit{12'000};
};

// The installed page folder when it exists, else the one in the source tree.
std::filesystem::path default_web_dir();

// WebSocket close codes of the gateway (4000-4999 is the range RFC 6455 leaves to applications).
inline constexpr std::uint16_t kCloseSendQueueFull = 4001;
inline constexpr std::uint16_t kCloseShuttingDown = 1001;  // RFC 6455 "going away"
inline constexpr std::uint16_t kCloseTooBig = 1009;        // RFC 6455 "message too big"

}  // namespace liveprob::gateway
