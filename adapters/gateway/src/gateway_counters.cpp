#include "gateway_hub.hpp"
#include "liveprob/protocol/json_writer.hpp"

namespace liveprob::gateway {

std::string GatewayCounters::render_json(std::size_t clients_open, std::size_t matches) const {
    std::string out;
    protocol::JsonWriter json(out);
    json.begin_object()
        .member("kind", "gateway")
        .member("matches", matches)
        .member("clients_open", clients_open)
        .member("updates_received", updates_received)
        .member("updates_rejected", updates_rejected)
        .member("updates_stale", updates_stale)
        .member("update_gaps", update_gaps)
        .member("snapshot_requests", snapshot_requests)
        .member("snapshot_failures", snapshot_failures)
        .member("clients_opened", clients_opened)
        .member("clients_dropped_slow", clients_dropped_slow)
        .member("clients_closed_oversize", clients_closed_oversize)
        .member("clients_idle_timeout", clients_idle_timeout)
        .member("origins_rejected", origins_rejected)
        .member("frames_sent", frames_sent)
        .member("frames_conflated", frames_conflated)
        .member("bad_requests", bad_requests)
        .member("http_requests", http_requests)
        .member("http_not_found", http_not_found)
        .member("upstream_messages", upstream_messages)
        .member("upstream_losses", upstream_losses)
        .member("snapshot_parts", snapshot_parts)
        .member("matches_retired", matches_retired)
        .end_object();
    return out;
}

}  // namespace liveprob::gateway
