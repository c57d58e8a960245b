// Fuzz the rules-driven feed mapper. The first byte chooses the rules: the harbour or meadow
// example (protocol/mappings/), whose mapper then reads the rest as provider lines (team ids
// learned from one line carry over to the next, as in a feed), or none, when the rest is itself
// a rules file. Whatever the bytes: a rules file is accepted or refused with one line naming
// the file; a provider line is a message, a skip, or one error line naming its line number;
// every message it accepts writes back to a native line that reads back to the same message.
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string_view>

#include "liveprob/protocol/feed_mapping.hpp"
#include "liveprob/protocol/json_feed.hpp"

namespace {

using namespace liveprob::protocol;

bool one_line(const std::string& text) { return text.find('\n') == std::string::npos; }

const FeedMapping& example(bool meadow) {
    static const FeedMapping harbour =
        FeedMapping::from_file(LIVEPROB_MAPPINGS_DIR "/harbour.rules.json");
    static const FeedMapping meadow_rules =
        FeedMapping::from_file(LIVEPROB_MAPPINGS_DIR "/meadow.rules.json");
    return meadow ? meadow_rules : harbour;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    if (size == 0) return 0;
    const std::string_view rest(reinterpret_cast<const char*>(data) + 1, size - 1);
    if (data[0] % 3 == 2) {
        try {
            (void)FeedMapping::from_text(rest, "fuzz.rules.json");
        } catch (const FeedMappingError& e) {
            const std::string what = e.what();
            if (what.rfind("fuzz.rules.json: ", 0) != 0 || !one_line(what)) std::abort();
        }
        return 0;
    }
    FeedMapper mapper(example(data[0] % 3 == 1));
    static JsonFeedReader reader;
    std::size_t number = 0, start = 0;
    while (start <= rest.size()) {
        auto end = rest.find('\n', start);
        if (end == std::string_view::npos) end = rest.size();
        const auto r = mapper.map_line(rest.substr(start, end - start), ++number);
        start = end + 1;
        if (r.kind == JsonLineKind::bad) {
            const std::string label = "line " + std::to_string(number) + ":";
            if (r.error.rfind(label, 0) != 0 || !one_line(r.error)) std::abort();
            continue;
        }
        if (r.kind != JsonLineKind::message) continue;
        const auto again = reader.read_line(to_json_line(*r.message), 1);
        if (again.kind != JsonLineKind::message || !(*again.message == *r.message)) std::abort();
    }
    return 0;
}
