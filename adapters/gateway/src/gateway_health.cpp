// The gateway's operations view: readiness, the metrics text, and the upstream state clients
// are told about.
#include <fmt/format.h>

#include "gateway_hub.hpp"
#include "liveprob/protocol/json_writer.hpp"

namespace liveprob::gateway {

namespace {

std::int64_t silent_ms(const GatewayHub& hub, std::chrono::steady_clock::time_point now) {
    if (hub.upstream == Upstream::waiting) return 0;
    return std::chrono::duration_cast<std::chrono::milliseconds>(now - hub.last_upstream).count();
}

}  // namespace

const char* upstream_name(Upstream u) noexcept {
    switch (u) {
        case Upstream::waiting: return "waiting";
        case Upstream::live: return "live";
        case Upstream::lost: return "lost";
    }
    return "?";
}

std::string GatewayHub::readiness_problem(std::chrono::steady_clock::time_point now) const {
    if (shutting_down) return "shutting down";
    switch (upstream) {
        case Upstream::waiting:
            return fmt::format("nothing received from serve yet ({})", config.feed_endpoint);
        case Upstream::lost:
            return fmt::format("nothing from serve for {} ms (limit {} ms)", silent_ms(*this, now),
                               config.upstream_silence_limit.count());
        case Upstream::live: return {};
    }
    return {};
}

std::string GatewayHub::render_upstream_json(std::chrono::steady_clock::time_point now) const {
    std::string out;
    protocol::JsonWriter(out)
        .begin_object()
        .member("kind", "upstream")
        .member("state", upstream_name(upstream))
        .member("silent_ms", silent_ms(*this, now))
        .member("limit_ms", static_cast<std::int64_t>(config.upstream_silence_limit.count()))
        .end_object();
    return out;
}

std::string GatewayHub::render_metrics() const {
    const GatewayCounters& c = counters;
    monitoring::MetricsText m;
    m.counter("liveprob_gateway_upstream_messages_total",
              "messages read from serve (updates and counters)", c.upstream_messages)
        .counter("liveprob_gateway_upstream_losses_total", "times serve fell silent past the limit",
                 c.upstream_losses)
        .gauge("liveprob_gateway_upstream_up", "1 while serve is heard within the limit",
               upstream == Upstream::live ? 1.0 : 0.0)
        .counter("liveprob_gateway_updates_received_total", "updates taken from the feed",
                 c.updates_received)
        .counter("liveprob_gateway_updates_rejected_total", "feed messages failing verification",
                 c.updates_rejected)
        .counter("liveprob_gateway_updates_stale_total", "updates not newer than the one held",
                 c.updates_stale)
        .counter("liveprob_gateway_update_gaps_total", "update sequence jumps (missed upstream)",
                 c.update_gaps)
        .counter("liveprob_gateway_snapshot_requests_total", "snapshots asked of serve",
                 c.snapshot_requests)
        .counter("liveprob_gateway_snapshot_failures_total", "snapshots that failed",
                 c.snapshot_failures)
        .counter("liveprob_gateway_snapshot_parts_total",
                 "snapshot reply frames read (a reply for every match may be several)",
                 c.snapshot_parts)
        .counter("liveprob_gateway_matches_retired_total",
                 "finished matches forgotten after their retention", c.matches_retired)
        .counter("liveprob_gateway_clients_opened_total", "WebSocket clients accepted",
                 c.clients_opened)
        .counter("liveprob_gateway_clients_dropped_slow_total",
                 "clients closed too far behind or with too many replies waiting",
                 c.clients_dropped_slow)
        .counter("liveprob_gateway_clients_closed_oversize_total",
                 "clients closed for an oversize message", c.clients_closed_oversize)
        .counter("liveprob_gateway_clients_idle_timeout_total", "clients cut off as idle",
                 c.clients_idle_timeout)
        .counter("liveprob_gateway_origins_rejected_total", "upgrades refused for their origin",
                 c.origins_rejected)
        .counter("liveprob_gateway_frames_sent_total", "frames written to clients", c.frames_sent)
        .counter("liveprob_gateway_frames_conflated_total",
                 "frames replaced by a newer one before sending", c.frames_conflated)
        .counter("liveprob_gateway_bad_requests_total", "client messages not understood",
                 c.bad_requests)
        .counter("liveprob_gateway_http_requests_total", "plain HTTP requests", c.http_requests)
        .counter("liveprob_gateway_http_not_found_total", "HTTP requests for nothing we have",
                 c.http_not_found)
        .gauge("liveprob_gateway_clients_open", "WebSocket clients connected now",
               static_cast<double>(clients.size()))
        .gauge("liveprob_gateway_matches", "matches held",
               static_cast<double>(latest.match_count()))
        .histogram("liveprob_gateway_delivery_seconds",
                   "update read off the feed to its frame written to a client", delivery);
    return m.text();
}

}  // namespace liveprob::gateway
