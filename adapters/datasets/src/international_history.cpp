#include "liveprob/datasets/international_history.hpp"

#include <charconv>

#include "csv_reader.hpp"
#include "liveprob/fit/calendar.hpp"

namespace liveprob::datasets {
namespace {

std::optional<int> count(std::string_view s) {
    int v = 0;
    const auto [end, ec] = std::from_chars(s.data(), s.data() + s.size(), v);
    if (ec != std::errc() || end != s.data() + s.size() || v < 0) return std::nullopt;
    return v;
}

}  // namespace

InternationalHistory read_international_history(const std::string& dir, BadRows bad_rows) {
    InternationalHistory out;
    InternationalRows read = read_international_rows(dir + "/results.csv", bad_rows);
    out.results = std::move(read.rows);
    out.skipped = read.unplayed + read.bad_skipped;
    out.duplicates = read.duplicates;
    enum { date, minute };
    detail::CsvReader csv(dir + "/goalscorers.csv", "the goal scorers file", {"date", "minute"});
    csv.for_each_row([&](int, auto field) {
        const auto day = fit::parse_iso_date(field(date));
        const auto m = count(field(minute));
        if (day && m && *m >= 1 && *m <= 90) out.goal_minutes.push_back({*day, *m});
    });
    return out;
}

}  // namespace liveprob::datasets
