// Delivery tickets and ingest acknowledgements: encode, and decode after verification.
#include "liveprob/protocol/ingest_ack_codec.hpp"

#include <fmt/format.h>

#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/wire/delivery_ticket_generated.h"
#include "liveprob/wire/ingest_ack_generated.h"
#include "verified_root.hpp"

namespace liveprob::protocol {

namespace {

namespace w = liveprob::wire;

constexpr detail::EnvelopeLimits kTicketLimits{kMaxDeliveryTicketBytes, "LPT1", 2, 2};
constexpr detail::EnvelopeLimits kAckLimits{kMaxIngestAckBytes, "LPA1", 3, 2};

std::vector<std::uint8_t> bytes_of(const flatbuffers::FlatBufferBuilder& fbb) {
    return {fbb.GetBufferPointer(), fbb.GetBufferPointer() + fbb.GetSize()};
}

// Reads one list of ranges; false (with `detail` set) when it breaks the rules.
bool read_ranges(const flatbuffers::Vector<const w::DeliveryRange*>* list, const char* name,
                 std::vector<TicketRange>& out, std::string& detail) {
    if (list == nullptr) return true;
    if (list->size() > kMaxAckRanges) {
        detail = detail::error_detail(
            DecodeError::bad_value,
            fmt::format("{}: {} ranges, at most {}", name, list->size(), kMaxAckRanges));
        return false;
    }
    out.reserve(list->size());
    for (const w::DeliveryRange* r : *list) {
        if (r->first() > r->last()) {
            detail = detail::error_detail(
                DecodeError::bad_value,
                fmt::format("{}: range {}..{} runs backwards", name, r->first(), r->last()));
            return false;
        }
        out.push_back({r->first(), r->last()});
    }
    return true;
}

}  // namespace

std::vector<std::uint8_t> encode_delivery_ticket(std::uint64_t ticket) {
    flatbuffers::FlatBufferBuilder fbb(64);
    fbb.Finish(w::CreateDeliveryTicket(fbb, kSchemaMajor, kSchemaMinor, ticket),
               w::DeliveryTicketIdentifier());
    return bytes_of(fbb);
}

Decoded<std::uint64_t> decode_delivery_ticket(std::span<const std::uint8_t> bytes) {
    Decoded<std::uint64_t> out;
    const auto verified = detail::verify_root<w::DeliveryTicket>(bytes, kTicketLimits);
    if (!verified.root) {
        out.error = verified.error;
        out.detail = verified.detail;
        return out;
    }
    out.value = verified.root->ticket();
    return out;
}

std::vector<std::uint8_t> encode_ingest_ack(const IngestAckContents& ack) {
    flatbuffers::FlatBufferBuilder fbb(64 + 16 * (ack.durable.size() + ack.refused.size()));
    const auto list = [&fbb](const std::vector<TicketRange>& ranges) {
        std::vector<w::DeliveryRange> wire;
        wire.reserve(ranges.size());
        for (const TicketRange& r : ranges) wire.emplace_back(r.first, r.last);
        return fbb.CreateVectorOfStructs(wire);
    };
    const auto durable = list(ack.durable);
    const auto refused = list(ack.refused);
    fbb.Finish(w::CreateIngestAck(fbb, kSchemaMajor, kSchemaMinor, durable, refused),
               w::IngestAckIdentifier());
    return bytes_of(fbb);
}

Decoded<IngestAckContents> decode_ingest_ack(std::span<const std::uint8_t> bytes) {
    Decoded<IngestAckContents> out;
    const auto verified = detail::verify_root<w::IngestAck>(bytes, kAckLimits);
    if (!verified.root) {
        out.error = verified.error;
        out.detail = verified.detail;
        return out;
    }
    IngestAckContents ack;
    if (!read_ranges(verified.root->durable(), "durable", ack.durable, out.detail) ||
        !read_ranges(verified.root->refused(), "refused", ack.refused, out.detail)) {
        out.error = DecodeError::bad_value;
        return out;
    }
    out.value = std::move(ack);
    return out;
}

void add_ticket(std::vector<TicketRange>& ranges, std::uint64_t ticket) {
    if (!ranges.empty() && ranges.back().last + 1 == ticket) {
        ranges.back().last = ticket;
    } else {
        ranges.push_back({ticket, ticket});
    }
}

}  // namespace liveprob::protocol
