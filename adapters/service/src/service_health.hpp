// Private to the service: its answers on the health address (adapters/monitoring): liveness,
// readiness with the reason, and the counters and the event -> publish histogram as metrics.
#pragma once

#include <string_view>

#include "liveprob/monitoring/health_listener.hpp"
#include "liveprob/monitoring/metrics_text.hpp"
#include "liveprob/service/service_counters.hpp"

namespace liveprob::service {

struct ServiceHealth {
    bool started = false;          // the journal is replayed and the sockets serve
    bool stopping = false;         // a signal asked it to stop
    bool journal_failing = false;  // the last journal append failed (messages are refused)
};

monitoring::HttpAnswer answer_service_http(std::string_view path, const ServiceHealth& health,
                                           const CounterList& counters,
                                           const monitoring::LatencyHistogram& event_to_publish);

}  // namespace liveprob::service
