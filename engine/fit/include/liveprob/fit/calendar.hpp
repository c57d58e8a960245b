// Dates as day numbers (days since 1970-01-01 in the proleptic Gregorian calendar), so that
// time-decay weights and "strictly before" comparisons are plain integer arithmetic.
#pragma once

#include <optional>
#include <string>
#include <string_view>

namespace liveprob::fit {

// Howard Hinnant's days_from_civil algorithm (published, public domain).
[[nodiscard]] int day_number(int year, int month, int day) noexcept;
// "YYYY-MM-DD" -> day number; nullopt if the text is not a valid calendar date.
[[nodiscard]] std::optional<int> parse_iso_date(std::string_view text) noexcept;
[[nodiscard]] std::string iso_date(int day_number);

}  // namespace liveprob::fit
