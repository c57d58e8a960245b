// Every single-byte corruption and every truncation of a valid buffer of each inbound kind is
// either rejected or decodes to a message that passes the same checks (and re-encodes to
// itself): never a crash or an out-of-bounds read. Each mutated buffer lives in its own
// exactly-sized heap block so the address sanitizer sees any read past its end.
#include <catch2/catch.hpp>

#include <memory>

#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/message_checks.hpp"
#include "sample_messages.hpp"

using namespace liveprob;

using namespace liveprob::core;
using namespace liveprob::protocol;

namespace {

struct Tally {
    std::size_t rejected = 0;
    std::size_t accepted = 0;
};

// Decodes `size` bytes copied into a fresh allocation of exactly that size; returns the
// message when it was accepted.
std::optional<InboundMessage> decode_exact(const std::uint8_t* data, std::size_t size,
                                           Tally& tally) {
    auto block = std::make_unique<std::uint8_t[]>(size == 0 ? 1 : size);
    std::copy(data, data + size, block.get());
    const auto result = decode_feed_message({block.get(), size});
    if (result.error != DecodeError::none) {
        REQUIRE_FALSE(result.message.has_value());
        REQUIRE_FALSE(result.detail.empty());
        ++tally.rejected;
        return std::nullopt;
    }
    REQUIRE(result.message.has_value());
    REQUIRE_FALSE(check_message(*result.message).has_value());
    const auto again = decode_feed_message(encode_feed_message(*result.message));
    REQUIRE(again.error == DecodeError::none);
    REQUIRE(*again.message == *result.message);
    ++tally.accepted;
    return result.message;
}

}  // namespace

TEST_CASE("every byte of every kind set to every value is handled", "[feed_codec][corruption]") {
    for (const auto& message : test::sample_messages()) {
        const auto valid = encode_feed_message(message);
        Tally tally;
        std::vector<std::uint8_t> mutated = valid;
        for (std::size_t pos = 0; pos < valid.size(); ++pos) {
            for (int value = 0; value < 256; ++value) {
                mutated[pos] = static_cast<std::uint8_t>(value);
                decode_exact(mutated.data(), mutated.size(), tally);
            }
            mutated[pos] = valid[pos];
        }
        INFO("kind " << kind_name(message.body) << ", " << valid.size() << " bytes");
        CHECK(tally.accepted + tally.rejected == valid.size() * 256);
        CHECK(tally.rejected > 0);  // corruption is noticed somewhere, so the test can fail
        CHECK(tally.accepted >= valid.size());  // the unchanged value at each position decodes
    }
}

TEST_CASE("every truncation of every kind is rejected or loses nothing",
          "[feed_codec][corruption]") {
    for (const auto& message : test::sample_messages()) {
        const auto valid = encode_feed_message(message);
        Tally tally;
        for (std::size_t size = 0; size < valid.size(); ++size) {
            INFO("kind " << kind_name(message.body) << ", cut to " << size << " of "
                         << valid.size());
            // Only trailing alignment padding may be cut and still verify; then nothing is lost.
            if (const auto decoded = decode_exact(valid.data(), size, tally)) {
                CHECK(*decoded == message);
                CHECK(size + 8 > valid.size());
            }
        }
        CHECK(tally.rejected + 8 >= valid.size());
    }
}
