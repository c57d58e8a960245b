// Error messages that quote their input (a configuration key, a value) stay on one line: the
// input may hold a newline or other control bytes (JSON's "\n" escape decodes to one), and a
// refusal is one line in logs and on the terminal. Control bytes are shown escaped.
#pragma once

#include <cstdio>
#include <string>
#include <string_view>

namespace liveprob::files {

inline std::string one_line(std::string_view text) {
    std::string out;
    out.reserve(text.size());
    for (const char c : text) {
        const auto byte = static_cast<unsigned char>(c);
        if (c == '\n') {
            out += "\\n";
        } else if (c == '\r') {
            out += "\\r";
        } else if (c == '\t') {
            out += "\\t";
        } else if (byte < 0x20 || byte == 0x7f) {
            char hex[5];
            std::snprintf(hex, sizeof hex, "\\x%02x", byte);
            out += hex;
        } else {
            out.push_back(c);
        }
    }
    return out;
}

}  // namespace liveprob::files
