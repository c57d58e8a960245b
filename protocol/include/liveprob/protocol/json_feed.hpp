// The JSON-lines form of inbound messages: one object per line, for people who type or script
// a feed. Field names are documented in protocol/README.md. Every line is checked as strictly
// as a FlatBuffers message (same semantic checks); unknown and repeated fields are errors.
#pragma once

#include <cstddef>
#include <memory>
#include <optional>
#include <string>
#include <string_view>

#include "liveprob/core/messages.hpp"
#include "liveprob/protocol/decode_error.hpp"

namespace liveprob::protocol {

enum class JsonLineKind : std::uint8_t {
    message,  // a valid message
    skipped,  // blank, or a comment starting with '#'
    bad,      // refused; see `error`
};

struct JsonLineResult {
    JsonLineKind kind = JsonLineKind::skipped;
    std::optional<core::InboundMessage> message;  // set exactly when kind == message
    std::string field;   // the field at fault ("" when the line is not a JSON object)
    std::string reason;  // what is wrong with it
    std::string error;   // one line: "line 12: field 'side': expected 'home' or 'away', got 'hme'"
    std::string kind_hint;  // the line's "type" when it could be read, for per-kind counts
};

// A refused line: kind bad, the field and reason, and the one-line error naming the line.
JsonLineResult refused_line(std::size_t line_number, std::string field, std::string reason);

// Reads lines one at a time; keeps its parser between lines so long feeds parse fast.
class JsonFeedReader {
public:
    JsonFeedReader();
    ~JsonFeedReader();
    JsonFeedReader(const JsonFeedReader&) = delete;
    JsonFeedReader& operator=(const JsonFeedReader&) = delete;

    // `line_number` counts from 1 and only labels errors. A trailing '\r' is ignored.
    JsonLineResult read_line(std::string_view line, std::size_t line_number);

private:
    struct Parser;
    std::unique_ptr<Parser> parser_;
};

// One line (no newline) that read_line turns back into `message`; defaults are left out.
std::string to_json_line(const core::InboundMessage& message);

// "67:12" for 4,032,000 ms, "67:12.250" when there are milliseconds.
std::string format_match_clock(std::uint32_t clock_ms);
// The reverse; nothing when `text` is not minutes:seconds[.fraction] with seconds below 60.
std::optional<std::uint32_t> parse_match_clock(std::string_view text);

}  // namespace liveprob::protocol
