// Checks a whole feed (JSON lines, a size-prefixed binary stream or a journal segment, told
// apart by content) and reports every bad line, frame or record. Backs `liveprob check-feed`.
#pragma once

#include <cstdint>
#include <functional>
#include <map>
#include <span>
#include <string>

namespace liveprob::protocol {

class FeedMapping;

enum class FeedForm : std::uint8_t { json_lines, frame_stream, journal };
const char* feed_form_name(FeedForm form) noexcept;

struct FeedCheckSummary {
    FeedForm form = FeedForm::json_lines;
    std::size_t units = 0;    // lines of text, or frames (plus one for a damaged tail)
    std::size_t ok = 0;       // valid messages
    std::size_t skipped = 0;  // blank and comment lines
    std::size_t bad = 0;      // refused lines or frames, and a damaged tail
    std::map<std::string, std::size_t> kinds;  // valid messages by kind
    // Not errors (the engine de-duplicates and re-orders), but worth knowing about a feed.
    std::size_t repeated_seq = 0;      // a (match, seq) seen before
    std::size_t out_of_order_seq = 0;  // a seq lower than an earlier one of the same match

    bool all_good() const noexcept { return bad == 0; }
};

// Calls `report` once per problem with one line ("line 12: field 'side': ..." or
// "frame 3 at offset 120: bad_value: ..."), in order, and returns the totals. With a `mapping`
// the feed is a provider's JSON lines, each mapped by the rules before it is checked.
FeedCheckSummary check_feed(std::span<const std::uint8_t> bytes,
                            const std::function<void(const std::string&)>& report,
                            const FeedMapping* mapping = nullptr);

// The summary as one JSON object (for scripts).
std::string summary_json(const FeedCheckSummary& summary);

}  // namespace liveprob::protocol
