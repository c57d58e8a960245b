#include <fmt/format.h>

#include "gateway_hub.hpp"

namespace liveprob::gateway {

std::string GatewayCounters::render_json(std::size_t clients_open, std::size_t matches) const {
    return fmt::format(
        R"({{"kind":"gateway","matches":{},"clients_open":{},"updates_received":{},)"
        R"("updates_rejected":{},"updates_stale":{},"update_gaps":{},)"
        R"("snapshot_requests":{},"snapshot_failures":{},"clients_opened":{},)"
        R"("clients_dropped_slow":{},"clients_closed_oversize":{},"clients_idle_timeout":{},)"
        R"("origins_rejected":{},"frames_sent":{},"frames_conflated":{},"bad_requests":{},)"
        R"("http_requests":{},"http_not_found":{}}})",
        matches, clients_open, updates_received, updates_rejected, updates_stale, update_gaps,
        snapshot_requests, snapshot_failures, clients_opened,
        clients_dropped_slow, clients_closed_oversize, clients_idle_timeout, origins_rejected,
        frames_sent, frames_conflated, bad_requests, http_requests, http_not_found);
}

}  // namespace liveprob::gateway
