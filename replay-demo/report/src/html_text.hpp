// The one HTML escape of the report: text placed in the page's elements and attributes.
#pragma once

#include <string>
#include <string_view>

namespace liveprob::report {

inline std::string html_escape(std::string_view text) {
    std::string out;
    for (const char c : text) {
        switch (c) {
            case '<': out += "&lt;"; break;
            case '>': out += "&gt;"; break;
            case '&': out += "&amp;"; break;
            case '"': out += "&quot;"; break;
            default: out += c;
        }
    }
    return out;
}

}  // namespace liveprob::report
