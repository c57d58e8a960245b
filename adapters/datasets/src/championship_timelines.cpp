#include <fmt/format.h>
#include <simdjson.h>

#include <algorithm>
#include <set>
#include <stdexcept>
#include <tuple>

#include "liveprob/datasets/match_timelines.hpp"
#include "liveprob/fit/calendar.hpp"
#include "liveprob/protocol/whole_file.hpp"
#include "timeline_checks.hpp"

namespace liveprob::datasets {
namespace {

using simdjson::dom::element;

// A pair [home, away] of whole numbers, or nullopt when absent or malformed.
std::optional<std::array<int, 2>> score_pair(element score, const char* key) {
    simdjson::dom::array pair;
    if (score[key].get_array().get(pair) != simdjson::SUCCESS || pair.size() != 2)
        return std::nullopt;
    std::int64_t h = -1, a = -1;
    if (pair.at(0).get_int64().get(h) != simdjson::SUCCESS ||
        pair.at(1).get_int64().get(a) != simdjson::SUCCESS || h < 0 || a < 0 || h > 99 || a > 99) {
        return std::nullopt;
    }
    return std::array<int, 2>{static_cast<int>(h), static_cast<int>(a)};
}

// "21:00" -> minutes after midnight.
std::optional<int> clock_time(std::string_view text) {
    if (text.size() != 5 || text[2] != ':') return std::nullopt;
    auto digit = [&](std::size_t i) {
        return text[i] >= '0' && text[i] <= '9' ? text[i] - '0' : -100;
    };
    const int h = digit(0) * 10 + digit(1), m = digit(3) * 10 + digit(4);
    if (h < 0 || h > 23 || m < 0 || m > 59) return std::nullopt;
    return h * 60 + m;
}

// Goals of one side's list; false when a goal has no usable minute.
bool read_goals(element match, const char* key, core::Side side, std::vector<TimelineGoal>& goals) {
    simdjson::dom::array list;
    if (match[key].get_array().get(list) != simdjson::SUCCESS) return true;  // no goals listed
    for (element g : list) {
        std::int64_t minute = 0, offset = 0;
        if (g["minute"].get_int64().get(minute) != simdjson::SUCCESS || minute < 1 || minute > 130)
            return false;
        if (g["offset"].error() == simdjson::SUCCESS &&
            (g["offset"].get_int64().get(offset) != simdjson::SUCCESS || offset < 0 ||
             offset > 30)) {
            return false;
        }
        bool penalty = false, own_goal = false;
        if (g["penalty"].get_bool().get(penalty) != simdjson::SUCCESS) penalty = false;
        if (g["owngoal"].get_bool().get(own_goal) != simdjson::SUCCESS) own_goal = false;
        goals.push_back(TimelineGoal{static_cast<int>(minute), static_cast<int>(offset), side,
                                     penalty, own_goal});
    }
    return true;
}

}  // namespace

TimelinesRead read_championship_timelines(const std::string& path) {
    const std::string text = protocol::read_whole_file(path, "the championship file");
    simdjson::dom::parser parser;
    element root;
    if (auto e = parser.parse(text).get(root); e != simdjson::SUCCESS)
        throw std::runtime_error(
            fmt::format("{}: not valid JSON: {}", path, simdjson::error_message(e)));
    simdjson::dom::array rounds;
    if (root["rounds"].get_array().get(rounds) != simdjson::SUCCESS)
        throw std::runtime_error(fmt::format("{}: no \"rounds\" array", path));
    std::string_view name;
    const std::string competition =
        root["name"].get_string().get(name) == simdjson::SUCCESS ? std::string(name) : path;

    TimelinesRead out;
    std::set<std::tuple<int, std::string, std::string>> seen;
    for (element round : rounds) {
        simdjson::dom::array matches;
        if (round["matches"].get_array().get(matches) != simdjson::SUCCESS) continue;
        for (element m : matches) {
            std::string_view date, home, away, time;
            std::int64_t number = 0;
            const auto ft = score_pair(m["score"], "ft");
            const bool named = m["date"].get_string().get(date) == simdjson::SUCCESS &&
                               m["team1"]["name"].get_string().get(home) == simdjson::SUCCESS &&
                               m["team2"]["name"].get_string().get(away) == simdjson::SUCCESS &&
                               home != away && !home.empty() && !away.empty();
            const auto day = named ? fit::parse_iso_date(date) : std::nullopt;
            if (!day || !ft) {
                ++out.skipped.no_result;
                continue;
            }
            if (m["num"].get_int64().get(number) != simdjson::SUCCESS) number = 0;
            MatchTimeline t;
            t.day = *day;
            if (m["time"].get_string().get(time) == simdjson::SUCCESS)
                t.kickoff_minute = clock_time(time);
            t.home = home;
            t.away = away;
            t.neutral = true;
            t.competition = competition;
            t.origin_number =
                static_cast<std::uint32_t>(std::clamp<std::int64_t>(number, 0, 1'000'000));
            t.origin = fmt::format("{}: match {}", path, number);
            if (!seen.emplace(t.day, t.home, t.away).second) {
                ++out.skipped.duplicates;
                continue;
            }
            const auto et = score_pair(m["score"], "et");
            const auto pens = score_pair(m["score"], "p");
            if (!read_goals(m, "goals1", core::Side::home, t.goals) ||
                !read_goals(m, "goals2", core::Side::away, t.goals)) {
                ++out.skipped.goals_incomplete;
                continue;
            }
            if (pens && (*pens)[0] != (*pens)[1]) {
                t.shootout =
                    TimelineShootout{(*pens)[0] > (*pens)[1] ? core::Side::home : core::Side::away,
                                     std::nullopt, pens};
            }
            auto verdict = detail::finish_timeline(t, et.value_or(*ft), et.has_value());
            // The regulation score must agree with the goals' minutes too, unless the file gives
            // no extra-time score and the minutes show extra time: its "ft" is then the score
            // after extra time (the goals add up to it, checked above).
            const bool ft_after_extra_time = !et && t.extra_time_goals != std::array<int, 2>{0, 0};
            if (verdict == detail::TimelineVerdict::usable && t.regulation_goals != *ft &&
                !ft_after_extra_time) {
                verdict = detail::TimelineVerdict::goals_incomplete;
            }
            if (verdict != detail::TimelineVerdict::usable) {
                detail::count_skip(out.skipped, verdict);
                continue;
            }
            out.matches.push_back(std::move(t));
        }
    }
    std::stable_sort(out.matches.begin(), out.matches.end(),
                     [](const MatchTimeline& a, const MatchTimeline& b) { return a.day < b.day; });
    return out;
}

}  // namespace liveprob::datasets
