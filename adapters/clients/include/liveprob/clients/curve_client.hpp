// The client side of CURVE: the server's public key and the client's own key pair, read from the
// key files `liveprob keys` writes, and set on a socket before it connects.
#pragma once

#include <string>

#include <zmq.hpp>

namespace liveprob::clients {

struct CurveClientKeys {
    std::string server_public_z85;  // empty: plain (no CURVE)
    std::string client_public_z85;
    std::string client_secret_z85;
    bool enabled() const noexcept { return !server_public_z85.empty(); }
};

// Reads the three key files (server .public, own .public and .secret). With an empty server
// key file, CURVE stays off and the other two are ignored.
CurveClientKeys load_curve_client_keys(const std::string& server_public_file,
                                       const std::string& client_secret_file);
void apply_curve_client(zmq::socket_t& socket, const CurveClientKeys& keys);

}  // namespace liveprob::clients
