#include "liveprob/service/relay.hpp"

#include <atomic>
#include <csignal>
#include <cstdint>
#include <optional>
#include <span>
#include <stdexcept>
#include <thread>
#include <vector>

#include <fmt/format.h>
#include <spdlog/spdlog.h>
#include <zmq.hpp>

#include "liveprob/files/endpoints_file.hpp"
#include "liveprob/protocol/sharding.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/transport/message_parts.hpp"

namespace liveprob::service {

namespace {

namespace proto = liveprob::protocol;

std::span<const std::uint8_t> bytes_of(const zmq::message_t& m) {
    return {m.data<std::uint8_t>(), m.size()};
}

// One REQ socket per shard, rebuilt after a timeout (a REQ that missed its reply is stuck).
class ShardClient {
public:
    ShardClient(zmq::context_t& ctx, std::string endpoint, std::chrono::milliseconds timeout)
        : ctx_(ctx), endpoint_(std::move(endpoint)), timeout_(timeout) {
        connect();
    }

    // The shard's reply (its parts: the frames of one message), or nothing when it did not
    // answer in time.
    std::optional<std::vector<zmq::message_t>> ask(std::span<const std::uint8_t> request) {
        socket_->send(zmq::const_buffer(request.data(), request.size()), zmq::send_flags::none);
        zmq::pollitem_t item{socket_->handle(), 0, ZMQ_POLLIN, 0};
        if (zmq::poll(&item, 1, timeout_) > 0) {
            // The parts of a message arrive together, so once the first is here so are the rest.
            std::vector<zmq::message_t> parts(1);
            bool whole = static_cast<bool>(socket_->recv(parts.back(), zmq::recv_flags::dontwait));
            while (whole && parts.back().more()) {
                parts.emplace_back();
                whole = static_cast<bool>(socket_->recv(parts.back(), zmq::recv_flags::dontwait));
            }
            if (whole) return parts;
        }
        connect();
        return std::nullopt;
    }

private:
    void connect() {
        socket_.emplace(ctx_, zmq::socket_type::req);
        socket_->set(zmq::sockopt::linger, 0);
        socket_->connect(endpoint_);
    }

    zmq::context_t& ctx_;
    std::string endpoint_;
    std::chrono::milliseconds timeout_;
    std::optional<zmq::socket_t> socket_;
};

class SnapshotRouter {
public:
    SnapshotRouter(zmq::context_t& ctx, const RelayConfig& config) {
        for (const auto& ep : config.shard_snapshot)
            shards_.emplace_back(ctx, ep, config.shard_timeout);
    }

    // Answers one request payload with the parts of a complete reply.
    std::vector<std::vector<std::uint8_t>> answer(std::span<const std::uint8_t> payload) {
        const auto request = proto::decode_snapshot_request(payload);
        if (!request.ok())
            return proto::encode_snapshot_reply_parts({"bad request: " + request.detail, {}});
        const std::uint64_t id = *request.value;
        const auto count = static_cast<std::uint32_t>(shards_.size());
        if (id != 0) {
            auto& shard = shards_[proto::shard_of(id, count)];
            if (auto reply = shard.ask(payload)) {
                std::vector<std::vector<std::uint8_t>> parts;
                for (const auto& p : *reply)
                    parts.emplace_back(p.data<std::uint8_t>(), p.data<std::uint8_t>() + p.size());
                return parts;
            }
            return proto::encode_snapshot_reply_parts(
                {fmt::format("shard {} did not answer", proto::shard_of(id, count)), {}});
        }
        proto::SnapshotReplyContents merged;
        for (std::uint32_t k = 0; k < count; ++k) {
            auto reply = shards_[k].ask(payload);
            std::vector<std::span<const std::uint8_t>> parts;
            if (reply) {
                for (const auto& p : *reply) parts.push_back(bytes_of(p));
            }
            auto decoded = reply ? proto::decode_snapshot_reply_parts(parts)
                                 : proto::Decoded<proto::SnapshotReplyContents>{};
            if (!reply || !decoded.ok()) {
                if (!merged.error.empty()) merged.error += "; ";
                merged.error +=
                    reply ? fmt::format("shard {} sent a bad reply: {}", k, decoded.detail)
                          : fmt::format("shard {} did not answer", k);
                continue;
            }
            for (auto& u : decoded.value->updates) merged.updates.push_back(std::move(u));
        }
        return proto::encode_snapshot_reply_parts(merged);
    }

private:
    std::vector<ShardClient> shards_;
};

std::atomic<bool> g_stop{false};
extern "C" void on_stop_signal(int) { g_stop.store(true); }

void serve_snapshots(zmq::socket_t& front, SnapshotRouter& router) {
    std::vector<zmq::message_t> frames;
    while (!g_stop.load()) {
        zmq::pollitem_t item{front.handle(), 0, ZMQ_POLLIN, 0};
        if (zmq::poll(&item, 1, std::chrono::milliseconds(100)) <= 0) continue;
        frames.clear();
        do {
            frames.emplace_back();
            if (!front.recv(frames.back(), zmq::recv_flags::dontwait)) {
                frames.pop_back();
                break;
            }
        } while (frames.back().more());
        // Envelope: [peer id] [empty delimiter from REQ peers] payload.
        if (frames.size() < 2 || frames.size() > 3) continue;
        const auto parts = router.answer(bytes_of(frames.back()));
        for (std::size_t i = 0; i + 1 < frames.size(); ++i)
            front.send(frames[i], zmq::send_flags::sndmore | zmq::send_flags::dontwait);
        transport::send_parts(front, parts);
    }
}

}  // namespace

void run_relay(const RelayConfig& config) {
    if (config.shard_publish.empty()) throw std::runtime_error("relay: no shard publish endpoints");
    if (!config.shard_snapshot.empty() &&
        config.shard_snapshot.size() != config.shard_publish.size())
        throw std::runtime_error(
            fmt::format("relay: {} shard publish endpoints but {} snapshot endpoints",
                        config.shard_publish.size(), config.shard_snapshot.size()));
    zmq::context_t ctx;
    zmq::socket_t upstream(ctx, zmq::socket_type::xsub);
    zmq::socket_t downstream(ctx, zmq::socket_type::xpub);
    for (auto* s : {&upstream, &downstream}) {
        s->set(zmq::sockopt::linger, 0);
        s->set(zmq::sockopt::sndhwm, config.high_water_mark);
        s->set(zmq::sockopt::rcvhwm, config.high_water_mark);
    }
    for (const auto& ep : config.shard_publish) upstream.connect(ep);
    downstream.bind(config.publish_endpoint);

    std::optional<zmq::socket_t> snapshot_front;
    std::optional<SnapshotRouter> router;
    if (!config.shard_snapshot.empty()) {
        snapshot_front.emplace(ctx, zmq::socket_type::router);
        snapshot_front->set(zmq::sockopt::linger, 0);
        snapshot_front->bind(config.snapshot_endpoint);
        router.emplace(ctx, config);
    }

    const std::string publish_at = downstream.get(zmq::sockopt::last_endpoint);
    const std::string snapshot_at =
        snapshot_front ? snapshot_front->get(zmq::sockopt::last_endpoint) : "";
    if (!config.endpoints_file.empty())
        files::write_endpoints_file(config.endpoints_file,
                                    {{"publish", publish_at}, {"snapshot", snapshot_at}});
    spdlog::info("relay: {} shards -> publish {} snapshot {}", config.shard_publish.size(),
                 publish_at, snapshot_at.empty() ? "(off)" : snapshot_at);

    // The proxy runs on its own thread, steered by a PAIR control socket so SIGTERM stops it.
    zmq::socket_t control_in(ctx, zmq::socket_type::pair);
    zmq::socket_t control_out(ctx, zmq::socket_type::pair);
    control_in.bind("inproc://relay-control");
    control_out.connect("inproc://relay-control");
    std::thread forwarder(
        [&] { zmq::proxy_steerable(upstream, downstream, zmq::socket_ref(), control_in); });
    std::thread snapshots;
    if (snapshot_front) snapshots = std::thread([&] { serve_snapshots(*snapshot_front, *router); });

    std::signal(SIGINT, on_stop_signal);
    std::signal(SIGTERM, on_stop_signal);
    while (!g_stop.load()) std::this_thread::sleep_for(std::chrono::milliseconds(50));
    control_out.send(zmq::str_buffer("TERMINATE"), zmq::send_flags::none);
    forwarder.join();
    if (snapshots.joinable()) snapshots.join();
    spdlog::info("relay: stopped");
}

}  // namespace liveprob::service
