#include "soak_report.hpp"

#include "liveprob/protocol/json_writer.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>

namespace liveprob::soak {

namespace {

double at_quantile(const std::vector<double>& sorted, double q) {
    if (sorted.empty()) return 0.0;
    const auto i =
        static_cast<std::size_t>(std::llround(q * static_cast<double>(sorted.size() - 1)));
    return sorted[std::min(i, sorted.size() - 1)];
}

std::size_t in_window(const std::vector<double>& times, double from, double to) {
    return static_cast<std::size_t>(
        std::count_if(times.begin(), times.end(), [&](double t) { return t >= from && t < to; }));
}

std::string ms(double v) {
    return v < 10 ? fmt::format("{:.2f} ms", v) : fmt::format("{:.0f} ms", v);
}

// Event updates that should have come: every event sent minus those the engine refused.
std::uint64_t missing(const PhaseResult& r) {
    const std::uint64_t expected = r.sent - std::min(r.sent, r.rejected + r.duplicate_inputs);
    return expected > r.arrivals.size() ? expected - r.arrivals.size() : 0;
}

std::string summary_row(const char* what, const PhaseResult& r, double warmup) {
    const LatencyTails t = tails(r.arrivals, warmup, 1e300);
    return fmt::format("| {} | {:.0f} s | {} | {:.0f}/s | {} | {} | {} | {} | {} | {} | {} |\n",
                       what, r.send_seconds, r.sent,
                       static_cast<double>(r.sent) / std::max(r.send_seconds, 1e-9),
                       r.arrivals.size(), missing(r), r.tick_times.size(), ms(t.p50_ms),
                       ms(t.p99_ms), ms(t.p999_ms), ms(t.max_ms));
}

}  // namespace

LatencyTails tails(const std::vector<Arrival>& arrivals, double from_seconds, double to_seconds) {
    std::vector<double> us;
    for (const Arrival& a : arrivals) {
        if (a.at_seconds >= from_seconds && a.at_seconds < to_seconds) us.push_back(a.latency_us);
    }
    std::sort(us.begin(), us.end());
    LatencyTails t;
    t.count = us.size();
    t.p50_ms = at_quantile(us, 0.5) / 1e3;
    t.p99_ms = at_quantile(us, 0.99) / 1e3;
    t.p999_ms = at_quantile(us, 0.999) / 1e3;
    t.max_ms = us.empty() ? 0.0 : us.back() / 1e3;
    return t;
}

std::string markdown_report(const std::string& description, const PhaseResult& soak,
                            const PhaseResult* baseline, double warmup) {
    std::string out = fmt::format("{}\n\n", description);
    out +=
        "| path | sending took | events sent | send rate | event updates received | missing | tick "
        "updates | "
        "p50 | p99 | p99.9 | max |\n|---|---|---|---|---|---|---|---|---|---|---|\n";
    out += summary_row(soak.settings.backend == Backend::serve ? "serve" : "bare forwarder", soak,
                       warmup);
    if (baseline != nullptr) out += summary_row("bare forwarder (baseline)", *baseline, warmup);
    out += fmt::format(
        "\nLatency: the feed's send to the subscriber's receive, after the first {:.0f} s. Engine "
        "verdicts: {} accepted, {} late, {} duplicate, {} rejected; {} updates seen twice, {} "
        "unknown.\n\n",
        warmup, soak.accepted, soak.late, soak.duplicate_inputs, soak.rejected, soak.duplicates,
        soak.foreign);

    out +=
        "Over time (each row: the interval ending at `t`):\n\n| t | event updates/s | ticks/s | "
        "p50 | p99 | max |";
    const auto& names =
        soak.samples.empty() ? std::vector<ProcessSample>{} : soak.samples.front().processes;
    for (const auto& p : names) out += fmt::format(" {} RSS | {} CPU |", p.name, p.name);
    out += "\n|---|---|---|---|---|---|";
    for (std::size_t i = 0; i < names.size(); ++i) out += "---|---|";
    out += "\n";
    std::vector<double> arrival_times;
    arrival_times.reserve(soak.arrivals.size());
    for (const Arrival& a : soak.arrivals) arrival_times.push_back(a.at_seconds);
    double from = 0.0;
    for (const Sample& s : soak.samples) {
        const double span = std::max(s.at_seconds - from, 1e-9);
        const LatencyTails t = tails(soak.arrivals, from, s.at_seconds);
        out +=
            fmt::format("| {:.0f} s | {:.0f} | {:.0f} | {} | {} | {} |", s.at_seconds,
                        static_cast<double>(in_window(arrival_times, from, s.at_seconds)) / span,
                        static_cast<double>(in_window(soak.tick_times, from, s.at_seconds)) / span,
                        ms(t.p50_ms), ms(t.p99_ms), ms(t.max_ms));
        for (const auto& p : s.processes) {
            out += fmt::format(" {:.1f} MiB | {:.0f}% |", static_cast<double>(p.rss_kib) / 1024.0,
                               100.0 * p.cpu_share);
        }
        out += "\n";
        from = s.at_seconds;
    }
    return out;
}

std::string json_report(const std::string& description, const PhaseResult& soak,
                        const PhaseResult* baseline, double warmup) {
    // Times and shares rounded to what the measurement can tell (ms to 4 places, seconds to 3).
    const auto rounded = [](double x, double places) {
        const double scale = std::pow(10.0, places);
        return std::round(x * scale) / scale;
    };
    std::string out;
    protocol::JsonWriter json(out);
    const auto phase = [&](const PhaseResult& r) {
        const LatencyTails t = tails(r.arrivals, warmup, 1e300);
        json.begin_object()
            .member("backend", r.settings.backend == Backend::serve ? "serve" : "bare_forwarder")
            .member("rate", r.settings.rate)
            .member("seconds", r.settings.seconds)
            .member("shards", r.settings.shards)
            .member("sent", r.sent)
            .member("send_seconds", rounded(r.send_seconds, 3))
            .member("event_updates", r.arrivals.size())
            .member("missing", missing(r))
            .member("tick_updates", r.tick_times.size())
            .member("duplicates", r.duplicates)
            .member("accepted", r.accepted)
            .member("rejected", r.rejected);
        json.key("latency_ms")
            .begin_object()
            .member("p50", rounded(t.p50_ms, 4))
            .member("p99", rounded(t.p99_ms, 4))
            .member("p99_9", rounded(t.p999_ms, 4))
            .member("max", rounded(t.max_ms, 4))
            .end_object();
        json.key("samples").begin_array();
        for (const Sample& sample : r.samples) {
            json.begin_object()
                .member("t", rounded(sample.at_seconds, 3))
                .key("processes")
                .begin_array();
            for (const auto& p : sample.processes) {
                json.begin_object()
                    .member("name", p.name)
                    .member("rss_kib", p.rss_kib)
                    .member("cpu_share", rounded(p.cpu_share, 4))
                    .end_object();
            }
            json.end_array().end_object();
        }
        json.end_array().end_object();
    };
    json.begin_object()
        .member("description", description)
        .member("warmup_seconds", warmup)
        .key("soak");
    phase(soak);
    json.key("baseline");
    if (baseline) phase(*baseline);
    else json.null();
    json.end_object();
    out.push_back('\n');
    return out;
}

}  // namespace liveprob::soak
