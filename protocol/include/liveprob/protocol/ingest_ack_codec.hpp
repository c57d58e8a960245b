// Acknowledged ingest: the ticket a feed sends in front of each message, and the service's
// acknowledgement naming tickets by ranges (schemas/ingest_ack.fbs). Decoders verify first.
#pragma once

#include <cstdint>
#include <span>
#include <vector>

#include "liveprob/protocol/decode_error.hpp"

namespace liveprob::protocol {

inline constexpr std::size_t kMaxDeliveryTicketBytes = 256;
inline constexpr std::size_t kMaxIngestAckBytes = 256 * 1024;
// Ranges per list in one acknowledgement; the service sends more acknowledgements past this.
inline constexpr std::size_t kMaxAckRanges = 8192;

struct TicketRange {
    std::uint64_t first = 0;
    std::uint64_t last = 0;  // inclusive
    friend bool operator==(const TicketRange&, const TicketRange&) = default;
};

struct IngestAckContents {
    std::vector<TicketRange> durable;
    std::vector<TicketRange> refused;
    friend bool operator==(const IngestAckContents&, const IngestAckContents&) = default;
};

std::vector<std::uint8_t> encode_delivery_ticket(std::uint64_t ticket);
Decoded<std::uint64_t> decode_delivery_ticket(std::span<const std::uint8_t> bytes);

std::vector<std::uint8_t> encode_ingest_ack(const IngestAckContents& ack);
// Refuses a range with first > last, or more than kMaxAckRanges ranges in a list.
Decoded<IngestAckContents> decode_ingest_ack(std::span<const std::uint8_t> bytes);

// Adds `ticket` to `ranges`, extending the last range when it follows on.
void add_ticket(std::vector<TicketRange>& ranges, std::uint64_t ticket);

}  // namespace liveprob::protocol
