// `liveprob send`: pushes a feed file (JSON lines, or a recorded size-prefixed stream) to a
// service's ingest endpoint, or with several endpoints (shards in order) each match to the
// shard that owns it. This is also the JSON feed adapter: JSON lines are read, checked and
// turned into FlatBuffers messages here. The feed is read as it arrives (standard input, a
// pipe, a growing file with --follow), one message at a time: each is sent before the next is
// read. With --mapping RULES the lines are a data provider's own JSON, mapped by a rules file
// (protocol/feed_mapping.hpp) before they are sent. A bad line is reported with its line number and
// field, counted and skipped (exit 1 at the end). Pacing: as fast as possible, at a fixed rate, or
// by the match clock.
#include <fmt/format.h>
#include <fmt/ranges.h>

#include <signal.h>

#include <atomic>
#include <iostream>
#include <optional>
#include <vector>
#include <zmq.hpp>

#include "command_registry.hpp"
#include "liveprob/clients/feed_input.hpp"
#include "liveprob/clients/feed_pacing.hpp"
#include "liveprob/clients/shard_sender.hpp"
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

int run_send(const SendFlags& f) {
    if (f.speed < 0.0 || f.rate < 0.0) throw UsageError("--speed and --rate must not be negative");
    if (f.speed > 0.0 && f.rate > 0.0) throw UsageError("--speed and --rate are alternatives");
    if (f.format != "auto" && f.format != "jsonl" && f.format != "frames") {
        throw UsageError("--format must be auto, jsonl or frames");
    }
    if (!f.mapping.empty() && f.format == "frames")
        throw UsageError("--mapping reads a provider's JSON lines, not frames");
    if (f.to.size() > 1024) throw UsageError("--to: at most 1024 shard endpoints");
    install_stop_handlers();
    FeedMessages source(f);
    clients::ShardSenderOptions options;
    options.keys = clients::load_curve_client_keys(f.server_key, f.client_key);
    options.linger_ms = f.linger_ms;

    zmq::context_t context(1);
    clients::ShardSender sender(context, f.to, options);

    clients::FeedPacer pacer = f.rate > 0.0    ? clients::FeedPacer::at_rate(f.rate)
                               : f.speed > 0.0 ? clients::FeedPacer::by_match_clock(f.speed)
                                               : clients::FeedPacer::as_fast_as_possible();
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
               "(0/N first, comma-separated): each match goes to the shard that owns it")
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
        sub.add_option("--linger-ms", f->linger_ms, "how long to wait at exit for unsent messages")
            ->check(CLI::Range(0, 600000));
        return [f] { return run_send(*f); };
    },
}};

}  // namespace
}  // namespace liveprob::cli
