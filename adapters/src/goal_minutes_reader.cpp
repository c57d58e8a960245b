#include "liveprob/adapters/goal_minutes_reader.hpp"

#include <algorithm>
#include <charconv>
#include <map>
#include <stdexcept>
#include <tuple>
#include <vector>

#include "liveprob/adapters/csv_line.hpp"
#include "liveprob/adapters/results_readers.hpp"
#include "liveprob/adapters/text_file.hpp"
#include "liveprob/engine/fit/calendar.hpp"

namespace liveprob {

GoalMinutesRead read_regulation_goal_minutes(const std::string& results_csv, const std::string& goalscorers_csv) {
    using Key = std::tuple<int, std::string, std::string>;
    std::map<Key, int> final_goals;
    for (const auto& m : read_international_results(results_csv).matches)
        final_goals[{m.day, m.home, m.away}] = m.home_goals + m.away_goals;

    struct Timeline {
        std::vector<int> minutes;
        bool bad = false;
    };
    std::map<Key, Timeline> timelines;
    const std::string text = read_text_file(goalscorers_csv, "the goal scorers file");
    std::size_t start = 0;
    int c_date = -1, c_home = -1, c_away = -1, c_minute = -1;
    for (int line = 1; start < text.size(); ++line) {
        std::size_t end = text.find('\n', start);
        if (end == std::string::npos) end = text.size();
        const std::string_view row(text.data() + start, end - start);
        start = end + 1;
        if (row.empty()) continue;
        const auto f = split_csv_line(row);
        if (line == 1) {
            c_date = column_index(f, "date");
            c_home = column_index(f, "home_team");
            c_away = column_index(f, "away_team");
            c_minute = column_index(f, "minute");
            if (std::min({c_date, c_home, c_away, c_minute}) < 0)
                throw std::runtime_error(goalscorers_csv + ": header lacks a column of the goal scorers format");
            continue;
        }
        if (static_cast<int>(f.size()) <= std::max({c_date, c_home, c_away, c_minute})) continue;
        const auto day = fit::parse_iso_date(f[static_cast<std::size_t>(c_date)]);
        if (!day) continue;
        Timeline& t = timelines[{*day, f[static_cast<std::size_t>(c_home)], f[static_cast<std::size_t>(c_away)]}];
        const std::string& m = f[static_cast<std::size_t>(c_minute)];
        int minute = 0;
        const auto [p, ec] = std::from_chars(m.data(), m.data() + m.size(), minute);
        if (ec != std::errc() || p != m.data() + m.size() || minute < 1 || minute > 90) t.bad = true;
        else t.minutes.push_back(minute);
    }
    GoalMinutesRead out;
    for (const auto& [key, t] : timelines) {
        const auto it = final_goals.find(key);
        if (t.bad || it == final_goals.end() || it->second != static_cast<int>(t.minutes.size())) {
            ++out.matches_skipped;
            continue;
        }
        ++out.matches_used;
        for (int m : t.minutes) out.counts[static_cast<std::size_t>(m - 1)] += 1.0;
    }
    return out;
}

}  // namespace liveprob
