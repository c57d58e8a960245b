// `liveprob send`: pushes a feed file (JSON lines, or a recorded size-prefixed stream) to a
// service's ingest endpoint, or with several endpoints (shards in order) each match to the
// shard that owns it. This is also the JSON feed adapter: JSON lines are read, checked and
// turned into FlatBuffers messages here. The feed is read as it arrives (standard input, a
// pipe, a growing file with --follow), one message at a time: each is sent before the next is
// read. With --mapping RULES the lines are a data provider's own JSON, mapped by a rules file
// (protocol/feed_mapping.hpp) before they are sent. A bad line is reported with its line number and
// field, counted and skipped (exit 1 at the end). Pacing: as fast as possible, at a fixed rate, or
// by the match clock. Every message waits for the service's acknowledgement that it is journaled
// (adapters/clients/acked_sender.hpp): send exits 1 saying how many never were (--no-ack: fire
// and forget). With nats:// URLs as --to, the messages go to the cluster mode's feed stream
// instead, each acknowledged once a quorum of the stream's replicas stored it
// (adapters/cluster/feed_publisher.hpp).
#include <fmt/format.h>
#include <fmt/ranges.h>

#include <signal.h>

#include <atomic>
#include <iostream>
#include <optional>
#include <vector>
#include <zmq.hpp>

#include "command_registry.hpp"
#include "liveprob/clients/acked_sender.hpp"
#include "liveprob/clients/feed_input.hpp"
#include "liveprob/clients/feed_pacing.hpp"
#include "liveprob/clients/shard_sender.hpp"
#include "liveprob/cluster/cluster_setup.hpp"
#include "liveprob/cluster/feed_publisher.hpp"
#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/feed_mapping.hpp"
#include "liveprob/protocol/framing.hpp"
#include "liveprob/protocol/json_feed.hpp"
#include "liveprob/system/wall_clock.hpp"

namespace liveprob::cli {
namespace {

struct SendFlags {
    std::vector<std::string> to;  // one ingest endpoint per shard, in shard order
    std::string file;
    std::string format = "auto";
    double speed = 0.0;
    double rate = 0.0;
    bool stamp = false;
    std::string server_key;
    std::string client_key;
    int linger_ms = 5000;
    bool follow = false;
    std::string mapping;  // a provider's rules file: lines are the provider's, mapped first
    bool no_ack = false;
    std::size_t window = 20'000;
    int resend_ms = 5'000;
    int give_up_ms = 30'000;
    std::uint32_t cluster_partitions = cluster::ClusterLayout{}.partitions;
    std::uint32_t cluster_replicas = cluster::ClusterLayout{}.replicas;
};

// Where `stop` comes from: SIGINT or SIGTERM end a followed feed (or a stalled read) cleanly.
std::atomic<bool> g_stop{false};
void on_send_stop_signal(int) { g_stop.store(true, std::memory_order_relaxed); }

void install_stop_handlers() {
    struct sigaction action {};
    action.sa_handler = on_send_stop_signal;
    sigemptyset(&action.sa_mask);
    action.sa_flags = 0;  // no SA_RESTART: a blocked read returns so the stop flag is seen
    ::sigaction(SIGINT, &action, nullptr);
    ::sigaction(SIGTERM, &action, nullptr);
}

// The line source in front of the sending loop: units from the input as they arrive, each
// turned into a message; a unit that cannot be is reported on standard error (its line and
// field) and counted, and the next one is read.
class FeedMessages {
public:
    FeedMessages(const SendFlags& f)
        : input_(f.file,
                 f.mapping.empty() ? input_form(f.format) : clients::FeedInputForm::json_lines,
                 clients::FeedInputOptions{.follow = f.follow, .stop = &g_stop}) {
        if (!f.mapping.empty()) mapper_.emplace(protocol::FeedMapping::from_file(f.mapping));
    }

    std::optional<core::InboundMessage> next() {
        while (const auto unit = input_.next()) {
            if (auto message = decode(*unit)) return message;
        }
        if (!input_.end_detail().empty()) refuse(input_.end_detail());
        return std::nullopt;
    }
    std::uint64_t refused() const noexcept { return refused_; }
    std::uint64_t skipped() const noexcept { return skipped_; }

private:
    static std::optional<clients::FeedInputForm> input_form(const std::string& format) {
        if (format == "jsonl") return clients::FeedInputForm::json_lines;
        if (format == "frames") return clients::FeedInputForm::frames;
        return std::nullopt;
    }

    std::optional<core::InboundMessage> decode(const clients::FeedUnit& unit) {
        if (input_.form() == clients::FeedInputForm::frames) {
            const auto* bytes = reinterpret_cast<const std::uint8_t*>(unit.bytes.data());
            auto decoded = protocol::decode_feed_message({bytes, unit.bytes.size()});
            if (!decoded.message) {
                refuse(fmt::format("frame at offset {}: {}", unit.offset, decoded.detail));
                return std::nullopt;
            }
            return std::move(decoded.message);
        }
        if (unit.too_long) {
            refuse(fmt::format("line {}: longer than {} bytes", unit.number,
                               clients::FeedInput::kMaxLineBytes));
            return std::nullopt;
        }
        auto result = mapper_ ? mapper_->map_line(unit.bytes, unit.number)
                              : reader_.read_line(unit.bytes, unit.number);
        if (result.kind == protocol::JsonLineKind::bad) refuse(result.error);
        if (result.kind == protocol::JsonLineKind::skipped) ++skipped_;
        return std::move(result.message);
    }

    void refuse(const std::string& problem) {
        ++refused_;
        std::cerr << problem << std::endl;
    }

    clients::FeedInput input_;
    protocol::JsonFeedReader reader_;
    std::optional<protocol::FeedMapper> mapper_;  // with --mapping
    std::uint64_t refused_ = 0, skipped_ = 0;
};

clients::FeedPacer pacer_for(const SendFlags& f) {
    return f.rate > 0.0    ? clients::FeedPacer::at_rate(f.rate)
           : f.speed > 0.0 ? clients::FeedPacer::by_match_clock(f.speed)
                           : clients::FeedPacer::as_fast_as_possible();
}

// Each message waits for room in its shard's window; at the end, for every answer.
int send_acknowledged(const SendFlags& f, FeedMessages& source,
                      const clients::CurveClientKeys& keys) {
    clients::AckedSenderOptions options;
    options.keys = keys;
    options.window = f.window;
    options.resend_after = std::chrono::milliseconds(f.resend_ms);
    options.give_up_after = std::chrono::milliseconds(f.give_up_ms);
    zmq::context_t context(1);
    clients::AckedSender sender(context, f.to, options);
    clients::FeedPacer pacer = pacer_for(f);
    while (!sender.gave_up()) {
        auto m = source.next();
        if (!m) break;
        pacer.wait_for(*m);
        if (f.stamp) m->header.source_time_us = liveprob::system::wall_clock_us();
        sender.send(m->header.match_id, protocol::encode_feed_message(*m));
    }
    sender.finish();
    const std::string where =
        sender.shard_count() == 1
            ? f.to.front()
            : fmt::format("{} shards ({} each, in shard order)", sender.shard_count(),
                          fmt::join(sender.handed_per_shard(), ", "));
    std::string line = fmt::format("sent {} messages to {}: {} of {} acknowledged", sender.handed(),
                                   where, sender.durable(), sender.handed());
    if (sender.refused() > 0)
        line += fmt::format(", {} refused by the service (see its log)", sender.refused());
    if (sender.unanswered() > 0)
        line += fmt::format(", {} never acknowledged", sender.unanswered());
    if (sender.resent() > 0) line += fmt::format(" ({} sent again)", sender.resent());
    if (source.refused() > 0) line += fmt::format("; {} refused (see above)", source.refused());
    std::cout << line << std::endl;
    if (sender.gave_up()) std::cerr << "send: gave up: " << sender.give_up_reason() << std::endl;
    const bool all = sender.durable() == sender.handed();
    return all && source.refused() == 0 ? kExitOk : kExitFailure;
}

// The cluster target: the feed stream on a NATS JetStream cluster (made if missing).
int send_to_cluster(const SendFlags& f, FeedMessages& source) {
    cluster::ClusterLayout layout;
    layout.partitions = f.cluster_partitions;
    layout.replicas = f.cluster_replicas;
    cluster::NatsClient client(f.to, {.name = "liveprob send"});
    try {
        cluster::ensure_feed_stream(client.jetstream(), layout);
    } catch (const cluster::LayoutMismatch&) {
        throw;
    } catch (const cluster::NatsError& e) {
        // The cluster may be electing a leader or short of a quorum: publish anyway; what it
        // never acknowledges is counted and reported.
        std::cerr << "send: warning: " << e.what() << std::endl;
    }
    cluster::FeedPublisher publisher(client, layout,
                                     {.window = f.window,
                                      .resend_after = std::chrono::milliseconds(f.resend_ms),
                                      .give_up_after = std::chrono::milliseconds(f.give_up_ms)});
    clients::FeedPacer pacer = pacer_for(f);
    while (!publisher.gave_up()) {
        auto m = source.next();
        if (!m) break;
        pacer.wait_for(*m);
        if (f.stamp) m->header.source_time_us = liveprob::system::wall_clock_us();
        publisher.send(m->header, protocol::encode_feed_message(*m));
    }
    publisher.finish();
    std::string line =
        fmt::format("sent {} messages to stream {} ({} partitions) at {}: {} of {} acknowledged",
                    publisher.handed(), layout.feed_stream, layout.partitions, fmt::join(f.to, ","),
                    publisher.acknowledged(), publisher.handed());
    if (publisher.duplicates() > 0)
        line += fmt::format(" ({} of them already stored)", publisher.duplicates());
    if (publisher.unanswered() > 0)
        line += fmt::format(", {} never acknowledged", publisher.unanswered());
    if (publisher.resent() > 0) line += fmt::format(" ({} sent again)", publisher.resent());
    if (source.refused() > 0) line += fmt::format("; {} refused (see above)", source.refused());
    std::cout << line << std::endl;
    if (publisher.gave_up())
        std::cerr << "send: gave up: " << publisher.give_up_reason() << std::endl;
    return publisher.unanswered() == 0 && source.refused() == 0 ? kExitOk : kExitFailure;
}

int run_send(const SendFlags& f) {
    if (f.speed < 0.0 || f.rate < 0.0) throw UsageError("--speed and --rate must not be negative");
    if (f.speed > 0.0 && f.rate > 0.0) throw UsageError("--speed and --rate are alternatives");
    if (f.format != "auto" && f.format != "jsonl" && f.format != "frames") {
        throw UsageError("--format must be auto, jsonl or frames");
    }
    if (!f.mapping.empty() && f.format == "frames")
        throw UsageError("--mapping reads a provider's JSON lines, not frames");
    if (f.to.size() > 1024) throw UsageError("--to: at most 1024 shard endpoints");
    const bool to_cluster = cluster::is_nats_target(f.to);
    if (!to_cluster) {
        for (const auto& endpoint : f.to) {
            if (endpoint.rfind("nats://", 0) == 0)
                throw UsageError("--to: nats:// URLs and ZeroMQ endpoints cannot be mixed");
        }
    }
    if (to_cluster && f.no_ack) throw UsageError("--no-ack: not with a nats:// target");
    if (to_cluster && (!f.server_key.empty() || !f.client_key.empty()))
        throw UsageError("--server-key/--client-key: CURVE is ZeroMQ's; not with a nats:// target");
    install_stop_handlers();
    FeedMessages source(f);
    if (to_cluster) return send_to_cluster(f, source);
    const clients::CurveClientKeys keys =
        clients::load_curve_client_keys(f.server_key, f.client_key);
    if (!f.no_ack) return send_acknowledged(f, source, keys);
    clients::ShardSenderOptions options;
    options.keys = keys;
    options.linger_ms = f.linger_ms;

    zmq::context_t context(1);
    clients::ShardSender sender(context, f.to, options);

    clients::FeedPacer pacer = pacer_for(f);
    std::uint64_t sent = 0;
    // One message read, then sent: the next is read only once this one is handed to the socket,
    // so a slow service (a full queue) holds the reading back.
    while (auto m = source.next()) {
        pacer.wait_for(*m);
        if (f.stamp) {
            m->header.source_time_us = liveprob::system::wall_clock_us();
        }
        const std::vector<std::uint8_t> bytes = protocol::encode_feed_message(*m);
        sender.send(m->header.match_id, bytes);
        ++sent;
    }
    const std::string refused =
        source.refused() > 0 ? fmt::format("; {} refused (see above)", source.refused()) : "";
    if (sender.shard_count() == 1) {
        std::cout << fmt::format("sent {} messages to {}{}", sent, f.to.front(), refused)
                  << std::endl;
    } else {
        std::cout << fmt::format("sent {} messages to {} shards ({} each, in shard order){}", sent,
                                 sender.shard_count(), fmt::join(sender.sent_per_shard(), ", "),
                                 refused)
                  << std::endl;
    }
    return source.refused() > 0 ? kExitFailure : kExitOk;
}

const Registration registration{{
    "send",
    "push a feed file (JSON lines or a recorded stream) to a service's ingest endpoint",
    [](CLI::App& sub) -> std::function<int()> {
        auto f = std::make_shared<SendFlags>();
        sub.add_option(
               "--to", f->to,
               "ingest endpoint, e.g. tcp://127.0.0.1:7430; for shards, every shard's in order "
               "(0/N first, comma-separated): each match goes to the shard that owns it; or "
               "nats://host:port URLs (comma-separated) of a NATS JetStream cluster: the "
               "cluster mode's feed stream")
            ->required()
            ->allow_extra_args(false)  // one argument (split at commas): the feed file is never
                                       // taken for an endpoint
            ->delimiter(',');
        sub.add_option("file", f->file,
                       "feed: a file, a pipe, or - for standard input; read as it arrives")
            ->required();
        sub.add_flag("--follow", f->follow,
                     "at the end of a regular file, wait for it to grow (like tail -f) until "
                     "SIGINT/SIGTERM");
        sub.add_option("--format", f->format, "auto | jsonl | frames (size-prefixed stream)");
        sub.add_option("--speed", f->speed,
                       "pace by the match clock, this many times real time (0: no pacing)");
        sub.add_option("--rate", f->rate,
                       "send this many messages per second (0: as fast as possible)");
        sub.add_option("--mapping", f->mapping,
                       "the feed is a data provider's own JSON lines: map each with this rules "
                       "file (protocol/README.md, \"Feed mappings\")")
            ->check(CLI::ExistingFile);
        sub.add_flag("--stamp", f->stamp,
                     "set each message's source time to the moment it is sent");
        sub.add_option("--server-key", f->server_key, "CURVE: the service's .public key file");
        sub.add_option("--client-key", f->client_key, "CURVE: this feed's .secret key file");
        sub.add_option("--linger-ms", f->linger_ms,
                       "--no-ack: how long to wait at exit for unsent messages")
            ->check(CLI::Range(0, 600000));
        sub.add_flag("--no-ack", f->no_ack,
                     "fire and forget: do not wait for the service to acknowledge (exit 0 even "
                     "if nothing arrived)");
        sub.add_option("--window", f->window,
                       "messages per shard sent but not yet acknowledged (default 20000)")
            ->check(CLI::Range(1, 10'000'000));
        sub.add_option("--resend-ms", f->resend_ms,
                       "send unacknowledged messages again after this long without an "
                       "acknowledgement (default 5000)")
            ->check(CLI::Range(1, 3'600'000));
        sub.add_option("--give-up-ms", f->give_up_ms,
                       "stop, and exit 1 naming how many were never acknowledged, after this long "
                       "without an acknowledgement (default 30000)")
            ->check(CLI::Range(1, 3'600'000));
        sub.add_option("--cluster-partitions", f->cluster_partitions,
                       "nats:// target: match partitions of the feed stream (the same as the "
                       "engines'; default 16)")
            ->check(CLI::Range(1, 1024));
        sub.add_option("--cluster-replicas", f->cluster_replicas,
                       "nats:// target: copies of the feed stream if send makes it (default 3)")
            ->check(CLI::Range(1, 5));
        return [f] { return run_send(*f); };
    },
}};

}  // namespace
}  // namespace liveprob::cli
