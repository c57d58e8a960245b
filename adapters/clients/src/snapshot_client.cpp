#include "liveprob/clients/snapshot_client.hpp"

#include <fmt/format.h>

#include <stdexcept>

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
    zmq::message_t reply;
    if (!socket.recv(reply, zmq::recv_flags::none)) {
        throw std::runtime_error(
            fmt::format("snapshot {}: no reply within {} ms", endpoint, timeout.count()));
    }
    auto decoded = protocol::decode_snapshot_reply({reply.data<std::uint8_t>(), reply.size()});
    if (!decoded.ok())
        throw std::runtime_error(
            fmt::format("snapshot {}: bad reply: {}", endpoint, decoded.detail));
    return std::move(*decoded.value);
}

}  // namespace liveprob::clients
