// `liveprob tap`: subscribes to a service's publish socket and prints updates as a live table
// or as JSON lines, for one match or all; optionally starts from a snapshot (a late joiner),
// and with --latency reports percentiles of the delays the timestamps show.
#include <fmt/format.h>

#include <algorithm>
#include <atomic>
#include <chrono>
#include <csignal>
#include <iostream>
#include <optional>
#include <vector>
#include <zmq.hpp>

#include "command_registry.hpp"
#include "liveprob/clients/snapshot_client.hpp"
#include "liveprob/clients/update_subscriber.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/protocol/update_json.hpp"

namespace liveprob::cli {
namespace {

std::atomic<bool> interrupted{false};
extern "C" void on_interrupt(int) { interrupted = true; }

struct TapFlags {
    std::string from;
    std::optional<std::uint64_t> match;
    std::string snapshot;
    bool snapshot_only = false;
    std::string format = "table";
    std::uint64_t count = 0;
    bool events_only = false;
    bool latency = false;
    bool counters = false;
    int timeout_ms = 0;
    std::string server_key;
    std::string client_key;
};

// What caused the update, and what the service could not vouch for.
std::string cause_of(const protocol::DecodedUpdate& u) {
    std::string cause = u.meta.receive_time_us == 0 ? "tick" : "event";
    if (u.meta.feed_stale) cause += ", feed stale";
    if (u.meta.journal_failing) cause += ", journal failing";
    return cause;
}

std::string table_row(const protocol::DecodedUpdate& u) {
    const core::Outputs& o = u.outputs;
    const std::uint32_t seconds = o.clock.clock_ms / 1000;
    const std::string teams =
        u.details.known ? fmt::format("{} v {}", u.details.home_name, u.details.away_name) : "";
    return fmt::format(
        "{:>8} {:>6} {:>11} {:>3}:{:02} {:>2}-{:<2} {:6.1f}% {:6.1f}% {:6.1f}%  {:<5}  {}",
        u.meta.match_id, u.meta.output_seq, status_name(o.status), seconds / 60, seconds % 60,
        o.home_goals, o.away_goals, 100.0 * o.p_home, 100.0 * o.p_draw, 100.0 * o.p_away,
        cause_of(u), teams);
}

void print_update(const TapFlags& f, const protocol::DecodedUpdate& u, const char* source) {
    if (f.format == "jsonl") {
        std::cout << protocol::update_json(u, {.source = source, .gateway_receive_us = 0}) << '\n';
    } else {
        std::cout << table_row(u) << '\n';
    }
    std::cout.flush();
}

double percentile(std::vector<std::int64_t>& v, double q) {
    if (v.empty()) return 0.0;
    std::sort(v.begin(), v.end());
    const auto rank = static_cast<std::size_t>(q * static_cast<double>(v.size() - 1) + 0.5);
    return static_cast<double>(v[std::min(rank, v.size() - 1)]);
}

void report_latency(std::vector<std::int64_t>& end_to_end, std::vector<std::int64_t>& in_service) {
    const auto line = [](const char* what, std::vector<std::int64_t>& v) {
        std::cerr << fmt::format(
            "latency {} (us, n={}): p50 {:.0f} p99 {:.0f} p99.9 {:.0f} max {:.0f}\n", what,
            v.size(), percentile(v, 0.5), percentile(v, 0.99), percentile(v, 0.999),
            percentile(v, 1.0));
    };
    line("receive-to-tap", end_to_end);
    line("receive-to-publish", in_service);
}

int run_tap(const TapFlags& f) {
    if (f.format != "table" && f.format != "jsonl")
        throw UsageError("--format must be table or jsonl");
    if (f.snapshot_only && f.snapshot.empty()) throw UsageError("--snapshot-only needs --snapshot");
    const auto keys = clients::load_curve_client_keys(f.server_key, f.client_key);
    std::signal(SIGINT, on_interrupt);
    std::signal(SIGTERM, on_interrupt);

    zmq::context_t context(1);
    clients::SubscriberOptions subscription;
    subscription.match = f.match;
    subscription.counters = f.counters;
    subscription.keys = keys;
    clients::UpdateSubscriber sub(context, f.from, subscription);

    if (f.format == "table") {
        std::cout << fmt::format("{:>8} {:>6} {:>11} {:>6} {:>5} {:>7} {:>7} {:>7}  {:<5}  {}\n",
                                 "match", "seq", "status", "clock", "score", "home", "draw", "away",
                                 "cause", "teams");
    }
    // Subscribed first, then the snapshot: nothing published in between is missed (it may
    // arrive twice; the output sequence tells).
    if (!f.snapshot.empty()) {
        const auto reply = clients::request_snapshot(context, f.snapshot, f.match.value_or(0),
                                                     std::chrono::milliseconds(5000), keys);
        if (!reply.error.empty()) std::cerr << "liveprob tap: snapshot: " << reply.error << "\n";
        for (const auto& u : reply.updates) print_update(f, u, "snapshot");
        if (f.snapshot_only) return reply.error.empty() ? kExitOk : kExitFailure;
    }

    std::vector<std::int64_t> end_to_end;
    std::vector<std::int64_t> in_service;
    std::uint64_t printed = 0;
    auto last_message = std::chrono::steady_clock::now();
    while (!interrupted && (f.count == 0 || printed < f.count)) {
        const auto received = sub.receive();
        if (!received) {
            if (f.timeout_ms > 0 && std::chrono::steady_clock::now() - last_message >
                                        std::chrono::milliseconds(f.timeout_ms)) {
                std::cerr << fmt::format("liveprob tap: error: nothing received for {} ms\n",
                                         f.timeout_ms);
                if (f.latency) report_latency(end_to_end, in_service);
                return kExitFailure;
            }
            continue;
        }
        last_message = std::chrono::steady_clock::now();
        if (received->kind == clients::ReceivedMessage::Kind::counters) {
            std::string line;
            for (const auto& [name, value] : received->counters.values)
                line += fmt::format(" {}={}", name, value);
            std::cout << "counters:" << line << '\n' << std::flush;
            continue;
        }
        if (received->kind == clients::ReceivedMessage::Kind::undecodable) {
            std::cerr << "liveprob tap: dropped an update that does not decode: "
                      << received->problem << "\n";
            continue;
        }
        const protocol::DecodedUpdate& u = received->update;
        const bool tick = u.meta.receive_time_us == 0;
        if (f.events_only && tick) continue;
        if (f.latency && !tick) {
            end_to_end.push_back(received->arrived_us - u.meta.receive_time_us);
            in_service.push_back(u.meta.publish_time_us - u.meta.receive_time_us);
        }
        print_update(f, u, "live");
        ++printed;
    }
    if (f.latency) report_latency(end_to_end, in_service);
    return kExitOk;
}

const Registration registration{{
    "tap",
    "subscribe to a service and print its updates (table or JSON lines), optionally with latency",
    [](CLI::App& sub) -> std::function<int()> {
        auto f = std::make_shared<TapFlags>();
        sub.add_option("--from", f->from, "publish endpoint of serve (or relay)")->required();
        sub.add_option("--match", f->match, "only this match id");
        sub.add_option("--snapshot", f->snapshot,
                       "snapshot endpoint: print the current state first");
        sub.add_flag("--snapshot-only", f->snapshot_only, "print the snapshot and exit");
        sub.add_option(
            "--format", f->format,
            "table | jsonl (one update per line in the JSON form of protocol/README.md)");
        sub.add_flag_callback(
            "--json", [f] { f->format = "jsonl"; }, "the same as --format jsonl");
        sub.add_option("--count", f->count,
                       "exit after this many live updates (0: until interrupted)");
        sub.add_flag("--events-only", f->events_only, "skip the timer's republications");
        sub.add_flag(
            "--latency", f->latency,
            "at exit (also on Ctrl-C or SIGTERM), print delay percentiles from the timestamps");
        sub.add_flag("--counters", f->counters, "also print the service's counters");
        sub.add_option("--timeout-ms", f->timeout_ms,
                       "fail when nothing arrives for this long (0: wait)")
            ->check(CLI::Range(0, 3600000));
        sub.add_option("--server-key", f->server_key, "CURVE: the service's .public key file");
        sub.add_option("--client-key", f->client_key, "CURVE: this subscriber's .secret key file");
        return [f] { return run_tap(*f); };
    },
}};

}  // namespace
}  // namespace liveprob::cli
