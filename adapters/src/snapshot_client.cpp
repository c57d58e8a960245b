#include "liveprob/adapters/snapshot_client.hpp"

#include <fmt/format.h>

#include <stdexcept>

#include "liveprob/adapters/curve_keys.hpp"

namespace liveprob::adapters {

CurveClientKeys load_curve_client_keys(const std::string& server_public_file, const std::string& client_secret_file) {
    CurveClientKeys keys;
    if (server_public_file.empty()) return keys;
    if (client_secret_file.empty()) {
        throw KeyFileError("a CURVE client needs its own secret key file as well as the server's public key");
    }
    keys.server_public_z85 = read_key_file(server_public_file);
    keys.client_secret_z85 = read_key_file(client_secret_file);
    keys.client_public_z85 = public_key_of(keys.client_secret_z85);
    return keys;
}

void apply_curve_client(zmq::socket_t& socket, const CurveClientKeys& keys) {
    if (!keys.enabled()) return;
    socket.set(zmq::sockopt::curve_serverkey, keys.server_public_z85);
    socket.set(zmq::sockopt::curve_publickey, keys.client_public_z85);
    socket.set(zmq::sockopt::curve_secretkey, keys.client_secret_z85);
}

protocol::SnapshotReplyContents request_snapshot(zmq::context_t& context, const std::string& endpoint,
                                                 std::uint64_t match_id, std::chrono::milliseconds timeout,
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
        throw std::runtime_error(fmt::format("snapshot {}: no reply within {} ms", endpoint, timeout.count()));
    }
    auto decoded = protocol::decode_snapshot_reply({reply.data<std::uint8_t>(), reply.size()});
    if (!decoded.ok()) throw std::runtime_error(fmt::format("snapshot {}: bad reply: {}", endpoint, decoded.detail));
    return std::move(*decoded.value);
}

}  // namespace liveprob::adapters
