#include "liveprob/clients/update_subscriber.hpp"
#include "liveprob/system/wall_clock.hpp"

#include "liveprob/transport/topics.hpp"

namespace liveprob::clients {
namespace {}  // namespace

UpdateSubscriber::UpdateSubscriber(zmq::context_t& context, const std::string& endpoint,
                                   const SubscriberOptions& options)
    : socket_(context, zmq::socket_type::sub) {
    socket_.set(zmq::sockopt::linger, 0);
    socket_.set(zmq::sockopt::rcvtimeo, static_cast<int>(options.poll.count()));
    socket_.set(zmq::sockopt::rcvhwm, options.receive_high_water_mark);
    apply_curve_client(socket_, options.keys);
    socket_.set(zmq::sockopt::subscribe, options.match
                                             ? transport::match_topic_string(*options.match)
                                             : std::string(transport::kMatchTopicPrefix));
    if (options.counters)
        socket_.set(zmq::sockopt::subscribe, std::string(transport::kCountersTopic));
    socket_.connect(endpoint);
}

std::optional<ReceivedMessage> UpdateSubscriber::receive() {
    zmq::message_t topic;
    if (!socket_.recv(topic, zmq::recv_flags::none)) return std::nullopt;
    ReceivedMessage out;
    out.arrived_us = system::wall_clock_us();
    zmq::message_t body;
    if (!topic.more() || !socket_.recv(body, zmq::recv_flags::none)) {
        out.kind = ReceivedMessage::Kind::undecodable;
        out.problem = "a topic without a body";
        return out;
    }
    while (body.more()) {  // a publisher sends two frames; anything beyond is dropped
        zmq::message_t extra;
        if (!socket_.recv(extra, zmq::recv_flags::none)) break;
        body = std::move(extra);
        out.kind = ReceivedMessage::Kind::undecodable;
        out.problem = "more than two frames";
    }
    if (out.kind == ReceivedMessage::Kind::undecodable) return out;
    const std::span<const std::uint8_t> bytes(body.data<std::uint8_t>(), body.size());
    if (topic.to_string_view() == transport::kCountersTopic) {
        auto counters = protocol::decode_counters(bytes);
        if (counters.ok()) {
            out.kind = ReceivedMessage::Kind::counters;
            out.counters = std::move(*counters.value);
        } else {
            out.kind = ReceivedMessage::Kind::undecodable;
            out.problem = counters.detail;
        }
        return out;
    }
    auto update = protocol::decode_update(bytes);
    if (update.ok()) {
        out.update = std::move(*update.value);
    } else {
        out.kind = ReceivedMessage::Kind::undecodable;
        out.problem = update.detail;
    }
    return out;
}

}  // namespace liveprob::clients
