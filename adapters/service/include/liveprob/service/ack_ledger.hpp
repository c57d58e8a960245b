// Acknowledgements owed to feeds: tickets gathered per feed connection as its messages are
// handled, and sent as IngestAck messages once the journal's sync policy is met
// (protocol/README.md "Acknowledged ingest"). Part of the service core; no sockets here.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "liveprob/protocol/ingest_ack_codec.hpp"
#include "liveprob/service/service_counters.hpp"

namespace liveprob::service {

class ServiceActions;

class AckLedger {
public:
    // Owes `peer` an acknowledgement of `ticket`, durable or refused.
    void owe(std::string_view peer, std::uint64_t ticket, bool durable);
    bool empty() const noexcept { return owed_.empty(); }
    // Sends everything owed (split so that no message holds more ranges than the decoder
    // accepts) and forgets it; counts `ack.*`.
    void send(ServiceActions& actions, ServiceCounters& counters);
    // Forgets what is owed without sending: the sync that would have made it durable failed,
    // so nothing is promised and the feeds resend (duplicates are harmless). Refused tickets
    // go the same way; the resend is refused again.
    void withhold(ServiceCounters& counters);

private:
    struct Owed {
        std::string peer;  // the feed connection (the ingest ROUTER's routing id)
        protocol::IngestAckContents ack;
    };
    std::vector<Owed> owed_;  // one entry per feed with tickets since the last send
};

}  // namespace liveprob::service
