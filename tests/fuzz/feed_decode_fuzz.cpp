// Fuzz the inbound FlatBuffers path: whatever the bytes, decoding never crashes or reads out of
// bounds, and whatever it accepts re-encodes to a buffer that decodes to the same message.
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <span>

#include "liveprob/protocol/feed_codec.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    using namespace liveprob::protocol;
    const auto first = decode_feed_message(std::span<const std::uint8_t>(data, size));
    if (!first.message) return 0;
    const auto bytes = encode_feed_message(*first.message);
    const auto second = decode_feed_message(bytes);
    if (!second.message || !(*second.message == *first.message)) std::abort();
    return 0;
}
