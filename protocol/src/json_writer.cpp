#include "liveprob/protocol/json_writer.hpp"

#include <charconv>
#include <cmath>
#include <stdexcept>
#include <system_error>

namespace liveprob::protocol {

namespace {

constexpr char kHex[] = "0123456789abcdef";

// Length of the well-formed UTF-8 sequence starting at text[i], or 0 when it is not one;
// `consumed` is then the length of its maximal invalid prefix (at least 1), which becomes one
// U+FFFD. Byte ranges: the Unicode Standard, table 3-7 (well-formed UTF-8 byte sequences).
std::size_t utf8_sequence(std::string_view text, std::size_t i, std::size_t& consumed) {
    const auto byte = [&](std::size_t k) { return static_cast<unsigned char>(text[k]); };
    const unsigned char lead = byte(i);
    std::size_t length = 0;
    unsigned char second_low = 0x80;
    unsigned char second_high = 0xbf;
    if (lead >= 0xc2 && lead <= 0xdf) {
        length = 2;
    } else if (lead >= 0xe0 && lead <= 0xef) {
        length = 3;
        if (lead == 0xe0) second_low = 0xa0;
        if (lead == 0xed) second_high = 0x9f;  // no UTF-16 surrogates
    } else if (lead >= 0xf0 && lead <= 0xf4) {
        length = 4;
        if (lead == 0xf0) second_low = 0x90;
        if (lead == 0xf4) second_high = 0x8f;  // nothing above U+10FFFF
    } else {
        consumed = 1;
        return 0;
    }
    std::size_t k = 1;
    for (; k < length && i + k < text.size(); ++k) {
        const unsigned char c = byte(i + k);
        const unsigned char low = k == 1 ? second_low : 0x80;
        const unsigned char high = k == 1 ? second_high : 0xbf;
        if (c < low || c > high) break;
    }
    if (k == length) return length;
    consumed = k;
    return 0;
}

}  // namespace

void append_json_string(std::string& out, std::string_view text) {
    out.push_back('"');
    std::size_t i = 0;
    while (i < text.size()) {
        const char c = text[i];
        const auto u = static_cast<unsigned char>(c);
        if (u >= 0x80) {
            std::size_t consumed = 0;
            if (const std::size_t length = utf8_sequence(text, i, consumed); length != 0) {
                out.append(text.substr(i, length));
                i += length;
            } else {
                out += "\xef\xbf\xbd";  // U+FFFD REPLACEMENT CHARACTER
                i += consumed;
            }
            continue;
        }
        switch (c) {
            case '"': out += "\\\""; break;
            case '\\': out += "\\\\"; break;
            case '\b': out += "\\b"; break;
            case '\f': out += "\\f"; break;
            case '\n': out += "\\n"; break;
            case '\r': out += "\\r"; break;
            case '\t': out += "\\t"; break;
            default:
                if (u < 0x20) {
                    out += "\\u00";
                    out.push_back(kHex[u >> 4]);
                    out.push_back(kHex[u & 0xf]);
                } else {
                    out.push_back(c);
                }
        }
        ++i;
    }
    out.push_back('"');
}

std::string json_string(std::string_view text) {
    std::string out;
    append_json_string(out, text);
    return out;
}

void append_json_number(std::string& out, double number) {
    if (!std::isfinite(number)) throw std::invalid_argument("JSON has no NaN or infinity");
    // The shortest digits that read back to `number`, as d.ddde±x; then laid out.
    char buffer[32];
    const auto [end, ec] =
        std::to_chars(buffer, buffer + sizeof buffer, number, std::chars_format::scientific);
    if (ec != std::errc()) throw std::logic_error("to_chars failed on a finite double");
    const std::string_view text(buffer, static_cast<std::size_t>(end - buffer));
    const std::size_t e_at = text.find('e');
    std::string_view mantissa = text.substr(0, e_at);
    int exponent = 0;
    std::from_chars(text.data() + e_at + 1 + (text[e_at + 1] == '+' ? 1 : 0),
                    text.data() + text.size(), exponent);
    if (!mantissa.empty() && mantissa.front() == '-') {
        out.push_back('-');
        mantissa.remove_prefix(1);
    }
    std::string digits;
    for (const char c : mantissa) {
        if (c != '.') digits.push_back(c);
    }
    if (exponent >= -4 && exponent < 16) {
        const int point = exponent + 1;  // digits before the decimal point
        const auto count = static_cast<int>(digits.size());
        if (point <= 0) {
            out += "0.";
            out.append(static_cast<std::size_t>(-point), '0');
            out += digits;
        } else if (point >= count) {
            out += digits;
            out.append(static_cast<std::size_t>(point - count), '0');
        } else {
            out.append(digits, 0, static_cast<std::size_t>(point));
            out.push_back('.');
            out.append(digits, static_cast<std::size_t>(point));
        }
        return;
    }
    out.push_back(digits.front());
    if (digits.size() > 1) {
        out.push_back('.');
        out.append(digits, 1);
    }
    out.push_back('e');
    out.push_back(exponent < 0 ? '-' : '+');
    const int magnitude = exponent < 0 ? -exponent : exponent;
    if (magnitude < 10) out.push_back('0');
    out += std::to_string(magnitude);
}

JsonWriter::JsonWriter(std::string& out, JsonLayout layout) : out_(out), layout_(layout) {}

bool JsonWriter::on_one_line() const noexcept {
    return layout_ != JsonLayout::indented || (!levels_.empty() && levels_.back().one_line);
}

void JsonWriter::newline_and_indent(std::size_t depth) {
    out_.push_back('\n');
    out_.append(2 * depth, ' ');
}

// What comes between the items of a container: a comma after the first, then a line break (asked
// for, or the indented layout's) or, in the spaced layout, a space.
void JsonWriter::separate(Level& level) {
    if (!level.empty) out_.push_back(',');
    if (break_pending_) {
        out_.push_back('\n');
        break_pending_ = false;
    } else if (!on_one_line()) {
        newline_and_indent(levels_.size());
    } else if (!level.empty && layout_ != JsonLayout::compact) {
        out_.push_back(' ');
    }
    level.empty = false;
}

void JsonWriter::before_value() {
    if (levels_.empty()) {
        if (done_) throw std::logic_error("JsonWriter: a second top-level value");
        return;
    }
    Level& level = levels_.back();
    if (level.container == Container::object) {
        if (!level.key_written)
            throw std::logic_error("JsonWriter: a value in an object needs its key first");
        level.key_written = false;
        return;
    }
    separate(level);
}

JsonWriter& JsonWriter::key(std::string_view name) {
    if (levels_.empty() || levels_.back().container != Container::object) {
        throw std::logic_error("JsonWriter: a key outside an object");
    }
    Level& level = levels_.back();
    if (level.key_written) throw std::logic_error("JsonWriter: two keys in a row");
    separate(level);
    append_json_string(out_, name);
    out_.push_back(':');
    if (layout_ != JsonLayout::compact) out_.push_back(' ');
    level.key_written = true;
    return *this;
}

JsonWriter& JsonWriter::open(Container container, char bracket, bool one_line) {
    before_value();
    const bool inherited = !levels_.empty() && levels_.back().one_line;
    out_.push_back(bracket);
    levels_.push_back(Level{container, one_line || inherited, true, false});
    return *this;
}

JsonWriter& JsonWriter::close(Container container, char bracket) {
    if (levels_.empty() || levels_.back().container != container) {
        throw std::logic_error("JsonWriter: closing a container that is not open");
    }
    const Level level = levels_.back();
    if (level.key_written) throw std::logic_error("JsonWriter: a key without its value");
    const bool one_line = on_one_line();
    levels_.pop_back();
    if (break_pending_) {
        out_.push_back('\n');
        break_pending_ = false;
    } else if (!one_line && !level.empty) {
        newline_and_indent(levels_.size());
    }
    out_.push_back(bracket);
    if (levels_.empty()) done_ = true;
    return *this;
}

JsonWriter& JsonWriter::begin_object() { return open(Container::object, '{', false); }
JsonWriter& JsonWriter::begin_array() { return open(Container::array, '[', false); }
JsonWriter& JsonWriter::begin_object_on_one_line() { return open(Container::object, '{', true); }
JsonWriter& JsonWriter::begin_array_on_one_line() { return open(Container::array, '[', true); }
JsonWriter& JsonWriter::end_object() { return close(Container::object, '}'); }
JsonWriter& JsonWriter::end_array() { return close(Container::array, ']'); }

JsonWriter& JsonWriter::value(std::string_view text) {
    before_value();
    append_json_string(out_, text);
    if (levels_.empty()) done_ = true;
    return *this;
}

JsonWriter& JsonWriter::value(bool flag) { return raw(flag ? "true" : "false"); }

JsonWriter& JsonWriter::value(double number) {
    if (!std::isfinite(number)) throw std::invalid_argument("JSON has no NaN or infinity");
    before_value();
    append_json_number(out_, number);
    if (levels_.empty()) done_ = true;
    return *this;
}

JsonWriter& JsonWriter::integer(std::int64_t number) {
    before_value();
    out_ += std::to_string(number);
    if (levels_.empty()) done_ = true;
    return *this;
}

JsonWriter& JsonWriter::unsigned_integer(std::uint64_t number) {
    before_value();
    out_ += std::to_string(number);
    if (levels_.empty()) done_ = true;
    return *this;
}

JsonWriter& JsonWriter::null() { return raw("null"); }

JsonWriter& JsonWriter::raw(std::string_view json) {
    before_value();
    out_.append(json);
    if (levels_.empty()) done_ = true;
    return *this;
}

JsonWriter& JsonWriter::line_break() {
    break_pending_ = true;
    return *this;
}

}  // namespace liveprob::protocol
