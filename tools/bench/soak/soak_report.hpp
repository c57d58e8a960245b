// Turns soak phases into the figures RESULTS.md records: throughput, latency tails over the
// steady part, and memory and CPU over time — as Markdown for a person and JSON for a program.
#pragma once

#include <string>
#include <vector>

#include "soak_run.hpp"

namespace liveprob::soak {

struct LatencyTails {
    std::size_t count = 0;
    double p50_ms = 0, p99_ms = 0, p999_ms = 0, max_ms = 0;
};

// Latency of the event updates that arrived at or after `from_seconds` and before `to_seconds`.
LatencyTails tails(const std::vector<Arrival>& arrivals, double from_seconds, double to_seconds);

// `description` says what ran (rate, matches, shards ...); `warmup_seconds` are left out of the
// whole-run tails (never out of the over-time table).
std::string markdown_report(const std::string& description, const PhaseResult& soak,
                            const PhaseResult* baseline, double warmup_seconds);
std::string json_report(const std::string& description, const PhaseResult& soak,
                        const PhaseResult* baseline, double warmup_seconds);

}  // namespace liveprob::soak
