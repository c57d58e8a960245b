// `liveprob send`: pushes a feed file (JSON lines, or a recorded size-prefixed stream) to a
// service's ingest endpoint, or with several endpoints (shards in order) each match to the
// shard that owns it. This is also the JSON feed adapter: JSON lines are read, checked and
// turned into FlatBuffers messages here. The whole file is read and checked first, so a bad
// line stops the run before anything is sent. Pacing: as fast as possible, at a fixed rate,
// or by the match clock with a speed factor.
#include <fmt/format.h>
#include <fmt/ranges.h>

#include <chrono>
#include <fstream>
#include <iostream>
#include <thread>
#include <vector>
#include <zmq.hpp>

#include "command_registry.hpp"
#include "liveprob/clients/feed_pacing.hpp"
#include "liveprob/clients/shard_sender.hpp"
#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/framing.hpp"
#include "liveprob/protocol/json_feed.hpp"
#include "liveprob/protocol/whole_file.hpp"
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
};

std::vector<core::InboundMessage> read_json_lines(const std::string& path) {
    std::ifstream in(path);
    if (!in) throw std::runtime_error(path + ": cannot open");
    protocol::JsonFeedReader reader;
    std::vector<core::InboundMessage> messages;
    std::string line;
    std::size_t number = 0;
    while (std::getline(in, line)) {
        auto result = reader.read_line(line, ++number);
        if (result.kind == protocol::JsonLineKind::bad)
            throw std::runtime_error(path + ": " + result.error);
        if (result.message) messages.push_back(std::move(*result.message));
    }
    return messages;
}

std::vector<core::InboundMessage> read_frames(const std::string& path,
                                              const std::vector<std::uint8_t>& bytes) {
    protocol::FrameCursor cursor(bytes);
    std::vector<core::InboundMessage> messages;
    while (const auto frame = cursor.next()) {
        auto decoded = protocol::decode_feed_message(frame->payload);
        if (!decoded.message) {
            throw std::runtime_error(
                fmt::format("{}: frame at offset {}: {}", path, frame->offset, decoded.detail));
        }
        messages.push_back(std::move(*decoded.message));
    }
    if (cursor.end() != protocol::StreamEnd::clean)
        throw std::runtime_error(path + ": " + cursor.end_detail());
    return messages;
}

std::vector<core::InboundMessage> read_feed(const SendFlags& f) {
    if (f.format == "jsonl") return read_json_lines(f.file);
    const std::vector<std::uint8_t> bytes = protocol::read_whole_file_bytes(f.file, "the feed");
    if (f.format == "frames" || (f.format == "auto" && protocol::looks_like_frame_stream(bytes))) {
        return read_frames(f.file, bytes);
    }
    return read_json_lines(f.file);
}

int run_send(const SendFlags& f) {
    if (f.speed < 0.0 || f.rate < 0.0) throw UsageError("--speed and --rate must not be negative");
    if (f.speed > 0.0 && f.rate > 0.0) throw UsageError("--speed and --rate are alternatives");
    if (f.format != "auto" && f.format != "jsonl" && f.format != "frames") {
        throw UsageError("--format must be auto, jsonl or frames");
    }
    if (f.to.size() > 1024) throw UsageError("--to: at most 1024 shard endpoints");
    std::vector<core::InboundMessage> messages = read_feed(f);
    clients::ShardSenderOptions options;
    options.keys = clients::load_curve_client_keys(f.server_key, f.client_key);
    options.linger_ms = f.linger_ms;

    zmq::context_t context(1);
    clients::ShardSender sender(context, f.to, options);

    clients::FeedPacer pacer = f.rate > 0.0    ? clients::FeedPacer::at_rate(f.rate)
                               : f.speed > 0.0 ? clients::FeedPacer::by_match_clock(f.speed)
                                               : clients::FeedPacer::as_fast_as_possible();
    for (std::size_t i = 0; i < messages.size(); ++i) {
        pacer.wait_for(messages[i]);
        core::InboundMessage& m = messages[i];
        if (f.stamp) {
            m.header.source_time_us = liveprob::system::wall_clock_us();
        }
        const std::vector<std::uint8_t> bytes = protocol::encode_feed_message(m);
        sender.send(m.header.match_id, bytes);
    }
    if (sender.shard_count() == 1) {
        std::cout << fmt::format("sent {} messages to {}", messages.size(), f.to.front())
                  << std::endl;
    } else {
        std::cout << fmt::format("sent {} messages to {} shards ({} each, in shard order)",
                                 messages.size(), sender.shard_count(),
                                 fmt::join(sender.sent_per_shard(), ", "))
                  << std::endl;
    }
    return kExitOk;
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
        sub.add_option("file", f->file, "feed file")->required()->check(CLI::ExistingFile);
        sub.add_option("--format", f->format, "auto | jsonl | frames (size-prefixed stream)");
        sub.add_option("--speed", f->speed,
                       "pace by the match clock, this many times real time (0: no pacing)");
        sub.add_option("--rate", f->rate,
                       "send this many messages per second (0: as fast as possible)");
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
