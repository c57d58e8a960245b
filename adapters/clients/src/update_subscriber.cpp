#include "liveprob/clients/update_subscriber.hpp"
#include "liveprob/system/wall_clock.hpp"

#include "liveprob/transport/topics.hpp"

#include <cerrno>

namespace liveprob::clients {
namespace {

// One frame, waiting at most the poll time. A signal (Ctrl-C on `tap`) interrupts the wait:
// that is "nothing yet", so the caller's loop can look at its stop flag. A frame that follows
// one already taken (a body after its topic) is waited for again: the parts of one message
// arrive together, and dropping the half taken would lose the message.
bool receive_frame(zmq::socket_t& socket, zmq::message_t& frame, bool retry_on_signal) {
    for (;;) {
        try {
            return socket.recv(frame, zmq::recv_flags::none).has_value();
        } catch (const zmq::error_t& e) {
            if (e.num() != EINTR) throw;
            if (!retry_on_signal) return false;
        }
    }
}

}  // namespace

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
    if (!receive_frame(socket_, topic, false)) return std::nullopt;
    ReceivedMessage out;
    out.arrived_us = system::wall_clock_us();
    zmq::message_t body;
    if (!topic.more() || !receive_frame(socket_, body, true)) {
        out.kind = ReceivedMessage::Kind::undecodable;
        out.problem = "a topic without a body";
        return out;
    }
    while (body.more()) {  // a publisher sends two frames; anything beyond is dropped
        zmq::message_t extra;
        if (!receive_frame(socket_, extra, true)) break;
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
