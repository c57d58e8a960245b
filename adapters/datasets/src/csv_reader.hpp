// A CSV file with a header row, read whole: each row's fields looked up by column name, every
// problem an error naming the file and line. Shared by the open datasets' readers.
#pragma once

#include <fmt/format.h>

#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

#include "liveprob/files/csv_line.hpp"
#include "liveprob/protocol/whole_file.hpp"

namespace liveprob::datasets::detail {

// Reads a CSV file with a header row; `row` gets the line number and a field lookup by column.
class CsvReader {
public:
    CsvReader(const std::string& path, const std::string& what, std::vector<std::string> columns)
        : path_(path), text_(protocol::read_whole_file(path, what)), names_(std::move(columns)) {}

    template <typename Row>
    void for_each_row(Row&& row) {
        files::for_each_text_line(text_, [&](int line, std::string_view view) {
            std::vector<std::string> fields;
            try {
                fields = files::split_csv_line(view);
            } catch (const std::exception& e) {
                throw std::runtime_error(fmt::format("{}:{}: {}", path_, line, e.what()));
            }
            if (line == 1) {
                for (const auto& name : names_) {
                    const int c = files::column_index(fields, name);
                    if (c < 0)
                        throw std::runtime_error(
                            fmt::format("{}: header lacks the column '{}'", path_, name));
                    index_.push_back(static_cast<std::size_t>(c));
                }
                return;
            }
            auto field = [&](std::size_t column) -> std::string_view {
                const std::size_t c = index_.at(column);
                return c < fields.size() ? std::string_view(fields[c]) : std::string_view{};
            };
            row(line, field);
        });
    }

private:
    std::string path_;
    std::string text_;
    std::vector<std::string> names_;
    std::vector<std::size_t> index_;
};

}  // namespace liveprob::datasets::detail
