#include "service_health.hpp"

#include <fmt/format.h>

#include <string>

namespace liveprob::service {

namespace {

std::string readiness_problem(const ServiceHealth& h) {
    if (h.stopping) return "stopping";
    if (!h.started) return "starting (replaying the journal)";
    if (h.journal_failing) return "journal writes failing: feed messages are refused";
    return {};
}

// The counters topic's names ("ingest.rejected.too_big") as metric names; the two match counts
// are gauges (they go down), everything else only rises.
std::string render_metrics(const CounterList& counters,
                           const monitoring::LatencyHistogram& event_to_publish) {
    monitoring::MetricsText m;
    for (const auto& [name, value] : counters) {
        const std::string metric = "liveprob_serve_" + monitoring::metric_name(name);
        if (name == "matches" || name == "matches.live") {
            m.gauge(metric, fmt::format("{} (counters topic)", name), static_cast<double>(value));
        } else {
            m.counter(metric + "_total", fmt::format("{} (counters topic)", name), value);
        }
    }
    m.histogram("liveprob_serve_event_to_publish_seconds",
                "feed message received to its update published (receive_time_us to "
                "publish_time_us)",
                event_to_publish);
    return m.text();
}

}  // namespace

monitoring::HttpAnswer answer_service_http(std::string_view path, const ServiceHealth& health,
                                           const CounterList& counters,
                                           const monitoring::LatencyHistogram& event_to_publish) {
    if (path == "/health/live") return {200, "text/plain; charset=utf-8", "live\n"};
    if (path == "/health/ready") {
        const std::string problem = readiness_problem(health);
        if (problem.empty()) return {200, "text/plain; charset=utf-8", "ready\n"};
        return {503, "text/plain; charset=utf-8", "not ready: " + problem + "\n"};
    }
    if (path == "/metrics") {
        return {200, monitoring::kMetricsContentType, render_metrics(counters, event_to_publish)};
    }
    return {404, "text/plain; charset=utf-8", "not found\n"};
}

}  // namespace liveprob::service
