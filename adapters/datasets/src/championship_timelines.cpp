#include <fmt/format.h>
#include <simdjson.h>

#include <algorithm>
#include <set>
#include <stdexcept>
#include <tuple>

#include "championship_format.hpp"
#include "liveprob/datasets/match_timelines.hpp"
#include "liveprob/fit/calendar.hpp"
#include "liveprob/protocol/whole_file.hpp"
#include "timeline_checks.hpp"

namespace liveprob::datasets {
namespace {

using simdjson::dom::element;

// Goals of one side's list; false when a goal has no usable minute.
bool read_goals(element match, const char* key, core::Side side, std::vector<TimelineGoal>& goals) {
    simdjson::dom::array list;
    if (match[key].get_array().get(list) != simdjson::SUCCESS) return true;  // no goals listed
    for (element g : list) {
        const auto minute = detail::goal_minute(g);
        if (!minute) return false;
        bool penalty = false, own_goal = false;
        if (g["penalty"].get_bool().get(penalty) != simdjson::SUCCESS) penalty = false;
        if (g["owngoal"].get_bool().get(own_goal) != simdjson::SUCCESS) own_goal = false;
        goals.push_back(TimelineGoal{minute->minute, minute->stoppage, side, penalty, own_goal});
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
    std::string_view name;
    const std::string competition =
        root["name"].get_string().get(name) == simdjson::SUCCESS ? std::string(name) : path;

    TimelinesRead out;
    std::set<std::tuple<int, std::string, std::string>> seen;
    std::int64_t position = 0;
    for (element m : detail::championship_matches(root, path)) {
        ++position;
        std::string_view date, time;
        std::int64_t number = 0;
        const auto ft = detail::score_pair(m["score"], "ft");
        const auto home = detail::side_name(m["team1"]), away = detail::side_name(m["team2"]);
        const bool named = m["date"].get_string().get(date) == simdjson::SUCCESS && home && away &&
                           *home != *away && !home->empty() && !away->empty();
        const auto day = named ? fit::parse_iso_date(date) : std::nullopt;
        if (!day || !ft) {
            out.leave_out(day, SkipReason::no_result);
            continue;
        }
        // The match number when the file gives one, else the match's place in the file.
        if (m["num"].get_int64().get(number) != simdjson::SUCCESS) number = position;
        MatchTimeline t;
        t.day = *day;
        if (m["time"].get_string().get(time) == simdjson::SUCCESS)
            t.kickoff_minute = detail::clock_time(time);
        t.home = *home;
        t.away = *away;
        t.neutral = true;
        t.competition = competition;
        t.origin_number =
            static_cast<std::uint32_t>(std::clamp<std::int64_t>(number, 0, 1'000'000));
        t.origin = fmt::format("{}: match {}", path, number);
        if (!seen.emplace(t.day, t.home, t.away).second) {
            out.leave_out(t.day, SkipReason::duplicate);
            continue;
        }
        const auto et = detail::score_pair(m["score"], "et");
        const auto pens = detail::score_pair(m["score"], "p");
        if (!read_goals(m, "goals1", core::Side::home, t.goals) ||
            !read_goals(m, "goals2", core::Side::away, t.goals)) {
            out.leave_out(t.day, SkipReason::goals_incomplete);
            continue;
        }
        if (pens && (*pens)[0] != (*pens)[1]) {
            t.shootout = TimelineShootout{
                (*pens)[0] > (*pens)[1] ? core::Side::home : core::Side::away, std::nullopt, pens};
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
            detail::count_skip(out, t.day, verdict);
            continue;
        }
        out.matches.push_back(std::move(t));
    }
    std::stable_sort(out.matches.begin(), out.matches.end(),
                     [](const MatchTimeline& a, const MatchTimeline& b) { return a.day < b.day; });
    return out;
}

}  // namespace liveprob::datasets
