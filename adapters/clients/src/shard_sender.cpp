#include "liveprob/clients/shard_sender.hpp"

#include <stdexcept>

#include "liveprob/protocol/sharding.hpp"

namespace liveprob::clients {

ShardSender::ShardSender(zmq::context_t& context, const std::vector<std::string>& ingest_endpoints,
                         const ShardSenderOptions& options)
    : endpoints_(ingest_endpoints), sent_(ingest_endpoints.size(), 0) {
    if (endpoints_.empty()) throw std::invalid_argument("no ingest endpoint to send to");
    if (endpoints_.size() > 1024) throw std::invalid_argument("more than 1024 shard endpoints");
    sockets_.reserve(endpoints_.size());
    for (const std::string& endpoint : endpoints_) {
        // DEALER: the service's ingest is a ROUTER; a single-frame message asks for no
        // acknowledgement (AckedSender asks for them).
        zmq::socket_t& push = sockets_.emplace_back(context, zmq::socket_type::dealer);
        push.set(zmq::sockopt::linger, options.linger_ms);
        push.set(zmq::sockopt::sndhwm, options.send_high_water_mark);
        apply_curve_client(push, options.keys);
        push.connect(endpoint);
    }
}

void ShardSender::send(std::uint64_t match_id, std::span<const std::uint8_t> bytes) {
    const std::uint32_t shard = protocol::shard_of(match_id, shard_count());
    sockets_[shard].send(zmq::const_buffer(bytes.data(), bytes.size()), zmq::send_flags::none);
    ++sent_[shard];
}

}  // namespace liveprob::clients
