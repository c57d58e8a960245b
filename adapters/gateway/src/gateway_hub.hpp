// Private to the gateway: what the sessions share (settings, latest updates, counters, the set
// of open WebSocket clients). Everything runs on the gateway's one thread, so nothing locks.
#pragma once

#include <chrono>
#include <cstdint>
#include <map>
#include <optional>
#include <string>
#include <unordered_set>

#include "liveprob/gateway/gateway_config.hpp"
#include "liveprob/gateway/latest_updates.hpp"
#include "liveprob/monitoring/metrics_text.hpp"

namespace liveprob::gateway {

class WebSocketSession;

struct GatewayCounters {
    std::uint64_t updates_received = 0;
    std::uint64_t updates_rejected = 0;  // failed verification (counted, never forwarded)
    std::uint64_t updates_stale = 0;     // duplicate or older than what we hold
    std::uint64_t update_gaps = 0;       // update_seq jumped: something was missed upstream
    std::uint64_t snapshot_requests = 0;
    std::uint64_t snapshot_failures = 0;
    std::uint64_t clients_opened = 0;
    std::uint64_t clients_dropped_slow = 0;
    std::uint64_t clients_closed_oversize = 0;
    std::uint64_t clients_idle_timeout = 0;
    std::uint64_t origins_rejected = 0;
    std::uint64_t frames_sent = 0;
    std::uint64_t frames_conflated = 0;  // replaced by a newer frame before it was sent
    std::uint64_t bad_requests = 0;      // client messages we could not use
    std::uint64_t http_requests = 0;
    std::uint64_t http_not_found = 0;
    std::uint64_t upstream_messages = 0;  // anything from serve: updates and counters
    std::uint64_t upstream_losses = 0;    // times serve fell silent past the limit
    std::uint64_t snapshot_parts = 0;     // snapshot reply frames read (a reply may be several)
    std::uint64_t matches_retired = 0;    // finished matches forgotten after their retention

    std::string render_json(std::size_t clients_open, std::size_t matches) const;
};

// Whether serve is heard: waiting (nothing yet), live, or lost (silent past the limit).
enum class Upstream : std::uint8_t { waiting, live, lost };
const char* upstream_name(Upstream u) noexcept;

struct GatewayHub {
    GatewayHub(GatewayConfig c, std::map<std::string, std::string> files)
        : config(std::move(c)), latest(config.timeline_points), static_files(std::move(files)) {}

    GatewayConfig config;
    LatestUpdates latest;
    GatewayCounters counters;
    std::map<std::string, std::string> static_files;  // "/index.html" -> contents
    std::unordered_set<WebSocketSession*> clients;
    bool shutting_down = false;

    // Operations: how long frames take from the feed to a client, and whether serve is heard.
    monitoring::LatencyHistogram delivery;  // update read off the feed -> frame written to a client
    Upstream upstream = Upstream::waiting;
    std::chrono::steady_clock::time_point last_upstream{};

    // Why the gateway is not ready (empty: ready).
    std::string readiness_problem(std::chrono::steady_clock::time_point now) const;
    std::string render_metrics() const;
    // {"kind":"upstream","state":"lost","silent_ms":...}: what clients are told when it changes.
    std::string render_upstream_json(std::chrono::steady_clock::time_point now) const;
};

}  // namespace liveprob::gateway
