// A subscriber to a service's publish socket (serve or relay): one SUB socket, CURVE when keys
// are given, subscribed to one match or every match and, on request, the counters topic. Each
// message is verified and decoded; one that does not decode is handed back as such, never used.
// Used by `tap` and by the live replay.
#pragma once

#include <chrono>
#include <cstdint>
#include <optional>
#include <string>

#include <zmq.hpp>

#include "liveprob/clients/snapshot_client.hpp"
#include "liveprob/protocol/update_codec.hpp"

namespace liveprob::clients {

struct SubscriberOptions {
    std::optional<std::uint64_t> match;       // one match; none: every match
    bool counters = false;                    // also the service's counters topic
    std::chrono::milliseconds poll{100};      // how long receive() waits before it returns nothing
    int receive_high_water_mark = 1'000'000;  // messages queued here before ZeroMQ drops
    CurveClientKeys keys;
};

struct ReceivedMessage {
    enum class Kind : std::uint8_t { update, counters, undecodable };
    Kind kind = Kind::update;
    protocol::DecodedUpdate update;  // kind == update
    protocol::CounterSet counters;   // kind == counters
    std::string problem;             // kind == undecodable: why
    std::int64_t arrived_us = 0;     // wall time on arrival, microseconds since the epoch
};

class UpdateSubscriber {
public:
    // Subscribes, then connects (so nothing published after the connection is filtered out).
    UpdateSubscriber(zmq::context_t& context, const std::string& endpoint,
                     const SubscriberOptions& options);

    // The next message, or nothing when none arrived within the poll time or a signal
    // interrupted the wait (the caller checks its stop flag and calls again).
    std::optional<ReceivedMessage> receive();

private:
    zmq::socket_t socket_;
};

}  // namespace liveprob::clients
