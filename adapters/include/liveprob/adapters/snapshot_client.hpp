// Asks a service's snapshot socket for the latest state of one match (or, with match id 0, of
// every live match): for a subscriber that joins late. A DEALER socket with a deadline, so a
// service that does not answer costs a timeout, never a hang.
#pragma once

#include <chrono>
#include <cstdint>
#include <string>

#include <zmq.hpp>

#include "liveprob/protocol/update_codec.hpp"

namespace liveprob::adapters {

struct CurveClientKeys {
    std::string server_public_z85;  // empty: plain (no CURVE)
    std::string client_public_z85;
    std::string client_secret_z85;
    bool enabled() const noexcept { return !server_public_z85.empty(); }
};

// Reads the three key files (server .public, own .public and .secret). With an empty server
// key file, CURVE stays off and the other two are ignored.
CurveClientKeys load_curve_client_keys(const std::string& server_public_file, const std::string& client_secret_file);
void apply_curve_client(zmq::socket_t& socket, const CurveClientKeys& keys);

// Throws std::runtime_error on timeout or on a reply that does not decode.
protocol::SnapshotReplyContents request_snapshot(zmq::context_t& context, const std::string& endpoint,
                                                 std::uint64_t match_id, std::chrono::milliseconds timeout,
                                                 const CurveClientKeys& keys = {});

}  // namespace liveprob::adapters
