// Splitting one CSV line (RFC 4180 quoting: "a, b" and doubled quotes inside quotes).
#pragma once

#include <string>
#include <string_view>
#include <vector>

namespace liveprob::files {

// Fields of `line` (a trailing '\r' is dropped). Throws std::runtime_error on an unclosed quote.
std::vector<std::string> split_csv_line(std::string_view line);

// Index of `name` in a header row, or -1.
int column_index(const std::vector<std::string>& header, std::string_view name);

// Calls row(line_number, line) for every non-empty line of `text` (1-based numbers, a trailing
// '\r' dropped).
template <typename Row>
void for_each_text_line(std::string_view text, Row&& row) {
    std::size_t start = 0;
    int line = 0;
    while (start < text.size()) {
        std::size_t end = text.find('\n', start);
        if (end == std::string_view::npos) end = text.size();
        ++line;
        std::string_view view = text.substr(start, end - start);
        if (!view.empty() && view.back() == '\r') view.remove_suffix(1);
        if (!view.empty()) row(line, view);
        start = end + 1;
    }
}

}  // namespace liveprob::files
