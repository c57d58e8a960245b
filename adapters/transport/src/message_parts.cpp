#include "liveprob/transport/message_parts.hpp"

namespace liveprob::transport {

void send_parts(zmq::socket_t& socket, const std::vector<std::vector<std::uint8_t>>& parts) {
    for (std::size_t i = 0; i < parts.size(); ++i) {
        const auto more = i + 1 < parts.size() ? zmq::send_flags::sndmore : zmq::send_flags::none;
        socket.send(zmq::const_buffer(parts[i].data(), parts[i].size()),
                    more | zmq::send_flags::dontwait);
    }
}

}  // namespace liveprob::transport
