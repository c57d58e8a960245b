// Delivery tickets and ingest acknowledgements round-trip; the decoders refuse what is not
// theirs, what is damaged, and ranges that break the rules.
#include <catch2/catch.hpp>

#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/ingest_ack_codec.hpp"

using namespace liveprob::protocol;

TEST_CASE("a delivery ticket round-trips and is refused as an acknowledgement", "[protocol][ack]") {
    const auto bytes = encode_delivery_ticket(0xFFFF'FFFF'FFFF'FFF0ull);
    const auto ticket = decode_delivery_ticket(bytes);
    REQUIRE(ticket.ok());
    CHECK(*ticket.value == 0xFFFF'FFFF'FFFF'FFF0ull);
    CHECK(decode_ingest_ack(bytes).error == DecodeError::wrong_identifier);
}

TEST_CASE("an acknowledgement round-trips its ranges", "[protocol][ack]") {
    IngestAckContents ack;
    for (std::uint64_t t : {1u, 2u, 3u, 7u, 8u, 20u}) add_ticket(ack.durable, t);
    add_ticket(ack.refused, 5);
    CHECK(ack.durable == std::vector<TicketRange>{{1, 3}, {7, 8}, {20, 20}});
    const auto decoded = decode_ingest_ack(encode_ingest_ack(ack));
    REQUIRE(decoded.ok());
    CHECK(*decoded.value == ack);
    CHECK(decode_delivery_ticket(encode_ingest_ack(ack)).error == DecodeError::wrong_identifier);
}

TEST_CASE("acknowledgement decoding refuses backwards ranges, too many ranges and damage",
          "[protocol][ack]") {
    IngestAckContents backwards;
    backwards.refused.push_back({9, 4});
    const auto refused = decode_ingest_ack(encode_ingest_ack(backwards));
    CHECK(refused.error == DecodeError::bad_value);
    CHECK(refused.detail.find("backwards") != std::string::npos);

    IngestAckContents many;
    for (std::uint64_t i = 0; i <= kMaxAckRanges; ++i) many.durable.push_back({2 * i, 2 * i});
    CHECK(decode_ingest_ack(encode_ingest_ack(many)).error == DecodeError::bad_value);

    IngestAckContents fine;
    fine.durable.push_back({1, 100});
    auto bytes = encode_ingest_ack(fine);
    CHECK(decode_ingest_ack({bytes.data(), 3}).error == DecodeError::too_small);
    // Every truncation and every single-byte change is refused or decodes to valid ranges,
    // never read past its end (the sanitizer builds run this too).
    for (std::size_t cut = 0; cut < bytes.size(); ++cut) {
        const auto d = decode_ingest_ack({bytes.data(), cut});
        if (d.ok()) {
            for (const auto& r : d.value->durable) CHECK(r.first <= r.last);
        }
    }
    for (std::size_t i = 0; i < bytes.size(); ++i) {
        auto damaged = bytes;
        damaged[i] ^= 0xFF;
        const auto d = decode_ingest_ack(damaged);
        if (d.ok()) {
            for (const auto& r : d.value->durable) CHECK(r.first <= r.last);
        }
    }
}
