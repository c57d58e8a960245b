// Fuzz the JSON-lines feed reader: any bytes give a message, a skip or an error that names the
// line — never a crash — and every message it accepts writes back to a line that reads back
// to the same message.
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "liveprob/protocol/json_feed.hpp"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    using namespace liveprob::protocol;
    static JsonFeedReader reader;  // reused across inputs, as a long feed reuses it
    const std::string_view line(reinterpret_cast<const char*>(data), size);
    const auto first = reader.read_line(line, 1);
    if (first.kind == JsonLineKind::bad && first.error.rfind("line 1", 0) != 0) std::abort();
    if (first.kind != JsonLineKind::message) return 0;
    const std::string again = to_json_line(*first.message);
    const auto second = reader.read_line(again, 2);
    if (second.kind != JsonLineKind::message || !(*second.message == *first.message)) std::abort();
    return 0;
}
