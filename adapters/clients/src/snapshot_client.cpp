#include "liveprob/clients/snapshot_client.hpp"

#include <fmt/format.h>

#include <span>
#include <stdexcept>
#include <vector>

namespace liveprob::clients {

protocol::SnapshotReplyContents request_snapshot(zmq::context_t& context,
                                                 const std::string& endpoint,
                                                 std::uint64_t match_id,
                                                 std::chrono::milliseconds timeout,
                                                 const CurveClientKeys& keys) {
    zmq::socket_t socket(context, zmq::socket_type::dealer);
    socket.set(zmq::sockopt::linger, 0);
    socket.set(zmq::sockopt::rcvtimeo, static_cast<int>(timeout.count()));
    apply_curve_client(socket, keys);
    socket.connect(endpoint);
    const std::vector<std::uint8_t> request = protocol::encode_snapshot_request(match_id);
    socket.send(zmq::buffer(request), zmq::send_flags::none);
    // A reply for every match may come in parts: the frames of one message.
    std::vector<zmq::message_t> frames(1);
    if (!socket.recv(frames.back(), zmq::recv_flags::none)) {
        throw std::runtime_error(
            fmt::format("snapshot {}: no reply within {} ms", endpoint, timeout.count()));
    }
    while (frames.back().more()) {
        frames.emplace_back();
        if (!socket.recv(frames.back(), zmq::recv_flags::none))
            throw std::runtime_error(fmt::format("snapshot {}: reply cut short", endpoint));
    }
    std::vector<std::span<const std::uint8_t>> parts;
    for (const auto& f : frames) parts.emplace_back(f.data<std::uint8_t>(), f.size());
    auto decoded = protocol::decode_snapshot_reply_parts(parts);
    if (!decoded.ok())
        throw std::runtime_error(
            fmt::format("snapshot {}: bad reply: {}", endpoint, decoded.detail));
    return std::move(*decoded.value);
}

}  // namespace liveprob::clients
