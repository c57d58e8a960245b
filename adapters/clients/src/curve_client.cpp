#include "liveprob/clients/curve_client.hpp"

#include "liveprob/transport/curve_keys.hpp"

namespace liveprob::clients {

CurveClientKeys load_curve_client_keys(const std::string& server_public_file,
                                       const std::string& client_secret_file) {
    CurveClientKeys keys;
    if (server_public_file.empty()) return keys;
    if (client_secret_file.empty()) {
        throw transport::KeyFileError(
            "a CURVE client needs its own secret key file as well as the server's public key");
    }
    keys.server_public_z85 = transport::read_key_file(server_public_file);
    keys.client_secret_z85 = transport::read_key_file(client_secret_file);
    keys.client_public_z85 = transport::public_key_of(keys.client_secret_z85);
    return keys;
}

void apply_curve_client(zmq::socket_t& socket, const CurveClientKeys& keys) {
    if (!keys.enabled()) return;
    socket.set(zmq::sockopt::curve_serverkey, keys.server_public_z85);
    socket.set(zmq::sockopt::curve_publickey, keys.client_public_z85);
    socket.set(zmq::sockopt::curve_secretkey, keys.client_secret_z85);
}

}  // namespace liveprob::clients
