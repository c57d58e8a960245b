// The inbound FlatBuffers codec: every kind round-trips, and every rejection class is reached
// with its stable name and a one-line detail.
#include <catch2/catch.hpp>

#include <cmath>
#include <cstring>
#include <limits>

#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/message_checks.hpp"
#include "liveprob/wire/feed_generated.h"
#include "sample_messages.hpp"

using namespace liveprob;

using namespace liveprob::core;
using namespace liveprob::protocol;

namespace {

FeedDecodeResult decode(const std::vector<std::uint8_t>& bytes) {
    return decode_feed_message(bytes);
}

InboundMessage goal_message() {
    return test::sample_message(4, Period::first_half, 754'000, Goal{Side::home, false, false});
}

// A FeedMessage built by hand, for buffers the project's encoder would never write.
std::vector<std::uint8_t> hand_built(std::uint16_t major, bool with_body, bool with_clock) {
    namespace w = liveprob::wire;
    flatbuffers::FlatBufferBuilder fbb;
    const auto goal = w::CreateGoal(fbb, w::Side::Away);
    const w::MatchClock clock(w::Period::FirstHalf, 1000);
    const auto header = w::CreateHeader(fbb, 9, 1, 0, with_clock ? &clock : nullptr);
    fbb.Finish(
        w::CreateFeedMessage(fbb, major, 0, header, with_body ? w::Body::Goal : w::Body::NONE,
                             with_body ? goal.Union() : 0),
        w::FeedMessageIdentifier());
    return {fbb.GetBufferPointer(), fbb.GetBufferPointer() + fbb.GetSize()};
}

}  // namespace

TEST_CASE("every inbound kind survives encode then decode unchanged", "[feed_codec]") {
    for (const auto& message : test::sample_messages()) {
        INFO("kind " << kind_name(message.body));
        const auto bytes = encode_feed_message(message);
        CHECK(bytes.size() <= kMaxFeedMessageBytes);
        const auto result = decode(bytes);
        REQUIRE(result.error == DecodeError::none);
        REQUIRE(result.message.has_value());
        CHECK(*result.message == message);
        CHECK(result.detail.empty());
    }
}

TEST_CASE("a buffer at an odd address decodes the same as an aligned one", "[feed_codec]") {
    const auto message = test::sample_messages().at(11);  // shot with a double xG value
    const auto bytes = encode_feed_message(message);
    std::vector<std::uint8_t> shifted(bytes.size() + 3);
    std::memcpy(shifted.data() + 3, bytes.data(), bytes.size());
    const auto result = decode_feed_message(std::span(shifted).subspan(3));
    REQUIRE(result.error == DecodeError::none);
    CHECK(*result.message == message);
}

TEST_CASE("size limits come before anything is read", "[feed_codec]") {
    const std::vector<std::uint8_t> tiny{0x04, 0x00, 0x00};
    const auto small = decode(tiny);
    CHECK(small.error == DecodeError::too_small);
    CHECK(small.detail == "too_small: 3 bytes, a buffer needs at least 8");

    auto big = encode_feed_message(goal_message());
    big.resize(kMaxFeedMessageBytes + 1, 0);
    const auto over = decode(big);
    CHECK(over.error == DecodeError::oversize);
    CHECK(over.detail == "oversize: 65537 bytes, limit 65536");
    CHECK_FALSE(over.message.has_value());
}

TEST_CASE("a buffer of another message type is refused by its identifier", "[feed_codec]") {
    auto bytes = encode_feed_message(goal_message());
    std::memcpy(bytes.data() + 4, "LPU\x01", 4);
    const auto result = decode(bytes);
    CHECK(result.error == DecodeError::wrong_identifier);
    CHECK(result.detail == "wrong_identifier: expected 'LPF1', got 'LPU\\x01'");
    CHECK(std::string(decode_error_name(result.error)) == "wrong_identifier");
}

TEST_CASE("a root offset past the end is caught by the verifier", "[feed_codec]") {
    auto bytes = encode_feed_message(goal_message());
    bytes[0] = 0xF0;
    bytes[1] = 0xFF;
    const auto result = decode(bytes);
    CHECK(result.error == DecodeError::malformed);
    CHECK(result.detail.rfind("malformed: ", 0) == 0);
}

TEST_CASE("another schema major version is refused, a newer minor is read", "[feed_codec]") {
    const auto v2 = decode(hand_built(2, true, true));
    CHECK(v2.error == DecodeError::wrong_schema_version);
    CHECK(v2.detail == "wrong_schema_version: schema major version 2, this build reads 1");
    CHECK(decode(hand_built(kSchemaMajor, true, true)).error == DecodeError::none);
}

TEST_CASE("a message without body or clock is missing a field", "[feed_codec]") {
    // `body` is `required` in the schema, so the verifier itself refuses a message without one.
    const auto no_body = decode(hand_built(kSchemaMajor, false, true));
    CHECK(no_body.error == DecodeError::malformed);
    const auto no_clock = decode(hand_built(kSchemaMajor, true, false));
    CHECK(no_clock.error == DecodeError::missing_field);
    CHECK(no_clock.detail == "missing_field: field 'clock': the header has no match clock");
}

TEST_CASE("out-of-range values are named by field", "[feed_codec]") {
    auto m = goal_message();
    m.body = Goal{static_cast<Side>(7), false, false};
    auto r = decode(encode_feed_message(m));
    CHECK(r.error == DecodeError::bad_value);
    CHECK(r.detail == "bad_value: field 'side': 7 is not a side");

    m.body = ShotXg{Side::away, std::numeric_limits<double>::quiet_NaN()};
    r = decode(encode_feed_message(m));
    CHECK(r.error == DecodeError::bad_value);
    CHECK(r.detail == "bad_value: field 'xg': must be in [0, 1], got nan");

    m = goal_message();
    m.header.clock.period = static_cast<Period>(9);
    CHECK(decode(encode_feed_message(m)).detail == "bad_value: field 'period': 9 is not a period");

    m = goal_message();
    m.header.match_id = 0;
    CHECK(decode(encode_feed_message(m)).error == DecodeError::bad_value);

    m = goal_message();
    m.body = StoppageAnnounced{Period::shootout, 2};
    CHECK(decode(encode_feed_message(m)).detail ==
          "bad_value: field 'for_period': 'shootout' has no stoppage time");
}

TEST_CASE("a setup needs exactly one prior source and sane format", "[feed_codec]") {
    auto setup = std::get<MatchSetup>(test::sample_messages().at(0).body);
    auto m = test::sample_message(1, Period::pre_match, 0, setup);

    setup.prior.reset();
    m.body = setup;
    auto r = decode(encode_feed_message(m));
    CHECK(r.error == DecodeError::missing_field);
    CHECK(r.detail == "missing_field: field 'prior': a setup needs 'prior' or 'ratings'");

    setup.prior = PriorMeans{-1.0, 1.0};
    m.body = setup;
    CHECK(decode(encode_feed_message(m)).detail ==
          "bad_value: field 'prior.home': must be in (0, 10], got -1");

    setup.prior = PriorMeans{1.0, 1.0};
    setup.format.half_minutes = 0;
    m.body = setup;
    CHECK(decode(encode_feed_message(m)).detail ==
          "bad_value: field 'half_minutes': must be 1..60, got 0");

    setup.format.half_minutes = 45;
    setup.home_name.clear();
    m.body = setup;
    CHECK(decode(encode_feed_message(m)).detail == "bad_value: field 'home': must not be empty");
}
