// Asks a service's snapshot socket for the latest state of one match (or, with match id 0, of
// every live match): for a subscriber that joins late. A DEALER socket with a deadline, so a
// service that does not answer costs a timeout, never a hang.
#pragma once

#include <chrono>
#include <cstdint>
#include <string>

#include <zmq.hpp>

#include "liveprob/clients/curve_client.hpp"
#include "liveprob/protocol/update_codec.hpp"

namespace liveprob::clients {

// Throws std::runtime_error on timeout or on a reply that does not decode.
protocol::SnapshotReplyContents request_snapshot(zmq::context_t& context,
                                                 const std::string& endpoint,
                                                 std::uint64_t match_id,
                                                 std::chrono::milliseconds timeout,
                                                 const CurveClientKeys& keys = {});

}  // namespace liveprob::clients
