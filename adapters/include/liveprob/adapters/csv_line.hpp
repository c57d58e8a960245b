// Splitting one CSV line (RFC 4180 quoting: "a, b" and doubled quotes inside quotes).
#pragma once

#include <string>
#include <string_view>
#include <vector>

namespace liveprob {

// Fields of `line` (a trailing '\r' is dropped). Throws std::runtime_error on an unclosed quote.
std::vector<std::string> split_csv_line(std::string_view line);

// Index of `name` in a header row, or -1.
int column_index(const std::vector<std::string>& header, std::string_view name);

}  // namespace liveprob
