// JSON Pointer (RFC 6901): "/fixture/teams/0/id" names one value inside a JSON document. A
// pointer is parsed once (its reference tokens unescaped: "~1" is '/', "~0" is '~') and then
// evaluated against many documents. Used by the feed mapping to pick a provider's fields.
#pragma once

#include <optional>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace liveprob::protocol {

struct JsonPointerError : std::invalid_argument {
    using std::invalid_argument::invalid_argument;
};

class JsonPointer {
public:
    // "" is the whole document; otherwise the text starts with '/'. Throws JsonPointerError for
    // anything else, and for a '~' not followed by '0' or '1' (RFC 6901 section 3).
    static JsonPointer parse(std::string_view text);

    const std::string& text() const noexcept { return text_; }
    const std::vector<std::string>& tokens() const noexcept { return tokens_; }

private:
    std::string text_;
    std::vector<std::string> tokens_;  // unescaped reference tokens, in order
};

// The value `pointer` refers to in the JSON `document`, as compact JSON text; nothing when it
// refers to no value (a missing member, an index past the end or not a plain decimal index, a
// step into a string or number). Throws JsonPointerError when `document` is not JSON.
std::optional<std::string> evaluate_json_pointer(std::string_view document,
                                                 const JsonPointer& pointer);

}  // namespace liveprob::protocol
