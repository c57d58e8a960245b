// The championship JSON format as the two readers (timelines, results) see it, in both of its
// layouts: {"rounds": [{"matches": [...]}, ...]} or the matches as one list ({"matches": [...]}
// or a list at the top); a side as {"name": ...} or as a plain string; a goal minute as a whole
// number with an optional "offset" (minutes into stoppage) or as text, "67" or "90+4" (private).
#pragma once

#include <simdjson.h>

#include <array>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace liveprob::datasets::detail {

// Every match of the file in file order. Throws std::runtime_error naming `path` when the file
// has neither layout.
std::vector<simdjson::dom::element> championship_matches(simdjson::dom::element root,
                                                         const std::string& path);

// True when `root` has the championship layout with rounds, or is a list at the top.
bool looks_like_championship(simdjson::dom::element root);

// The side's name from "team1"/"team2": a string, or an object with "name".
std::optional<std::string_view> side_name(simdjson::dom::element side);

// A pair [home, away] of whole numbers 0..99 under score[key], or nullopt when absent or
// malformed.
std::optional<std::array<int, 2>> score_pair(simdjson::dom::element score, const char* key);

// "21:00" -> minutes after midnight; nullopt when not a time of day.
std::optional<int> clock_time(std::string_view text);

struct GoalMinute {
    int minute = 0;
    int stoppage = 0;  // minutes into the half's stoppage (the "4" of "90+4", or "offset")
};
// nullopt when the goal has no usable minute (1..130, stoppage 0..30).
std::optional<GoalMinute> goal_minute(simdjson::dom::element goal);

}  // namespace liveprob::datasets::detail
