// The one JSON writer: every JSON document liveprob writes (the gateway's frames and HTTP
// replies, the JSON-lines feed, the parameter and ratings files, reports, the --json output of
// the commands) goes through it. A streaming writer onto a std::string:
//  * strings are escaped in full: '"', '\\', the control characters (the short escapes \b \f \n
//    \r \t, \u00XX for the rest); bytes that are not valid UTF-8 are replaced by U+FFFD, one per
//    maximal invalid sequence (the Unicode recommended practice), so the output is always UTF-8;
//  * numbers are the shortest text that reads back to the same double (std::to_chars), laid out
//    in fixed notation for exponents -5 < e < 16 and in exponent form otherwise, with no ".0" on
//    whole numbers; NaN and infinity are refused (JSON has neither): write null, or a string,
//    where a value may be missing, and say so in the format's documentation;
//  * three layouts: compact, spaced (", " and ": ", one line) and indented (two spaces, one
//    member per line); in an indented document a container may be kept on one line.
// Misuse (a key outside an object, a value without its key, unclosed containers) throws
// std::logic_error: a bug in the caller, never a property of the data.
#pragma once

#include <concepts>
#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

namespace liveprob::protocol {

enum class JsonLayout : std::uint8_t {
    compact,   // {"a":1,"b":[1,2]}
    spaced,    // {"a": 1, "b": [1, 2]}
    indented,  // one member or element per line, two spaces per level
};

class JsonWriter {
public:
    explicit JsonWriter(std::string& out, JsonLayout layout = JsonLayout::compact);

    JsonWriter& begin_object();
    JsonWriter& begin_array();
    // In an indented document: this container and everything in it on one line (spaced).
    JsonWriter& begin_object_on_one_line();
    JsonWriter& begin_array_on_one_line();
    JsonWriter& end_object();
    JsonWriter& end_array();

    JsonWriter& key(std::string_view name);

    JsonWriter& value(std::string_view text);
    JsonWriter& value(const char* text) { return value(std::string_view(text)); }
    JsonWriter& value(const std::string& text) { return value(std::string_view(text)); }
    JsonWriter& value(bool flag);
    JsonWriter& value(double number);  // throws std::invalid_argument for NaN or infinity
    template <std::integral T>
    requires(!std::same_as<T, bool> && !std::same_as<T, char>) JsonWriter& value(T number) {
        if constexpr (std::is_signed_v<T>) return integer(static_cast<std::int64_t>(number));
        else return unsigned_integer(static_cast<std::uint64_t>(number));
    }
    JsonWriter& null();
    // An already rendered JSON value (for example a frame rendered once and sent many times).
    JsonWriter& raw(std::string_view json);

    template <class T>
    JsonWriter& member(std::string_view name, const T& v) {
        key(name);
        return value(v);
    }

    // A newline before whatever comes next (compact and spaced documents that a person may
    // also skim: a report's sections one per line). Whitespace only; the values are the same.
    JsonWriter& line_break();

    // True once the top-level value is complete.
    bool done() const noexcept { return done_; }

private:
    enum class Container : std::uint8_t { object, array };
    struct Level {
        Container container;
        bool one_line = false;
        bool empty = true;
        bool key_written = false;
    };

    JsonWriter& integer(std::int64_t number);
    JsonWriter& unsigned_integer(std::uint64_t number);
    JsonWriter& open(Container container, char bracket, bool one_line);
    JsonWriter& close(Container container, char bracket);
    void separate(Level& level);
    void before_value();
    void newline_and_indent(std::size_t depth);
    bool on_one_line() const noexcept;

    std::string& out_;
    JsonLayout layout_;
    std::vector<Level> levels_;
    bool done_ = false;
    bool break_pending_ = false;
};

// `text` as a JSON string literal, quotes included, escaped as above.
void append_json_string(std::string& out, std::string_view text);
std::string json_string(std::string_view text);
// `number` as the writer lays it out; throws std::invalid_argument for NaN or infinity.
void append_json_number(std::string& out, double number);

}  // namespace liveprob::protocol
