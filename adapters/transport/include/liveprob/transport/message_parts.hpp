// Buffers sent as the frames of one ZeroMQ message (a reply too big for one frame, in parts).
#pragma once

#include <cstdint>
#include <vector>

#include <zmq.hpp>

namespace liveprob::transport {

// Sends `parts` as the remaining frames of the message under way, the last one ending it. Never
// blocks: a peer past its high-water mark loses the message (ROUTER sockets drop it whole).
void send_parts(zmq::socket_t& socket, const std::vector<std::vector<std::uint8_t>>& parts);

}  // namespace liveprob::transport
