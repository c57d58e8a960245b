#include "liveprob/service/ack_ledger.hpp"

#include <algorithm>

#include "liveprob/service/service_ports.hpp"

namespace liveprob::service {

namespace {
std::uint64_t tickets_in(const std::vector<protocol::TicketRange>& ranges) {
    std::uint64_t n = 0;
    for (const auto& r : ranges) n += r.last - r.first + 1;
    return n;
}
}  // namespace

void AckLedger::owe(std::string_view peer, std::uint64_t ticket, bool durable) {
    auto it =
        std::find_if(owed_.begin(), owed_.end(), [&](const Owed& o) { return o.peer == peer; });
    if (it == owed_.end()) {
        owed_.push_back({std::string(peer), {}});
        it = owed_.end() - 1;
    }
    protocol::add_ticket(durable ? it->ack.durable : it->ack.refused, ticket);
}

void AckLedger::send(ServiceActions& actions, ServiceCounters& counters) {
    for (const Owed& o : owed_) {
        std::size_t d = 0, r = 0;
        while (d < o.ack.durable.size() || r < o.ack.refused.size()) {
            protocol::IngestAckContents part;
            const std::size_t dn = std::min(o.ack.durable.size() - d, protocol::kMaxAckRanges);
            const std::size_t rn = std::min(o.ack.refused.size() - r, protocol::kMaxAckRanges);
            part.durable.assign(o.ack.durable.begin() + static_cast<std::ptrdiff_t>(d),
                                o.ack.durable.begin() + static_cast<std::ptrdiff_t>(d + dn));
            part.refused.assign(o.ack.refused.begin() + static_cast<std::ptrdiff_t>(r),
                                o.ack.refused.begin() + static_cast<std::ptrdiff_t>(r + rn));
            d += dn;
            r += rn;
            counters.acked_durable += tickets_in(part.durable);
            counters.acked_refused += tickets_in(part.refused);
            const std::vector<std::uint8_t> bytes = protocol::encode_ingest_ack(part);
            actions.acknowledge(o.peer, bytes);
            ++counters.acks_sent;
        }
    }
    owed_.clear();
}

void AckLedger::withhold(ServiceCounters& counters) {
    for (const Owed& o : owed_) counters.acks_withheld += tickets_in(o.ack.durable);
    owed_.clear();
}

}  // namespace liveprob::service
