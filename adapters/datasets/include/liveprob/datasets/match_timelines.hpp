// Finished matches with the minute of every goal, read from the open datasets' formats, for
// building recorded streams (`liveprob import`):
//  - the international results (results.csv), goal scorers (goalscorers.csv) and shoot-outs
//    (shootouts.csv) in one folder;
//  - a championship file (euro.json: rounds of matches with score.ft/et/p and goals1/goals2,
//    each goal with minute, offset (minutes into stoppage), penalty, owngoal).
// A match is taken only when its goal records are complete: every goal has a usable minute and
// a side, and the goals of each side add up to its final score. Everything left out is counted
// by reason; nothing is half-used.
#pragma once

#include <array>
#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "liveprob/core/messages.hpp"
#include "liveprob/datasets/results_readers.hpp"

namespace liveprob::datasets {

struct TimelineGoal {
    int minute = 0;    // as the source counts: minute m is the clock from (m-1):00 to m:00;
                       // 91 and above are extra time
    int stoppage = 0;  // minutes into the half's stoppage when the source says so (45+2: 2)
    core::Side side = core::Side::home;  // the side credited with the goal
    bool penalty = false;
    bool own_goal = false;
    bool extra_time() const noexcept { return minute > 90; }
};

struct TimelineShootout {
    core::Side winner = core::Side::home;
    std::optional<core::Side> first_kicker;   // when the source names it
    std::optional<std::array<int, 2>> tally;  // kicks scored per side, when the source gives them
};

struct MatchTimeline {
    int day = 0;                        // day number (engine/fit/calendar.hpp)
    std::optional<int> kickoff_minute;  // minutes after midnight when the source gives a time
    std::string home, away;             // as the source spells them
    bool neutral = false;
    std::string competition;
    std::string origin;               // file and line or match number, for messages
    std::uint32_t origin_number = 0;  // that line or match number (a stable identity)
    std::array<int, 2> regulation_goals{};
    std::array<int, 2> extra_time_goals{};
    bool extra_time = false;  // extra time was played
    std::optional<TimelineShootout> shootout;
    std::vector<TimelineGoal> goals;  // in the order they were scored
    // False when the source gives only the half-time and full-time scores (the league files):
    // the goals are then listed at minute 45 (first half) and 90 (second half), and the feed
    // tells the score at the interval only (timeline_feed.hpp).
    bool goal_minutes_known = true;
};

struct TimelineSkips {
    int no_result = 0;         // no final score in the source (not played)
    int unreadable = 0;        // a row that cannot be read, skipped under BadRows::skip
    int duplicates = 0;        // the same (date, home, away) again
    int goals_incomplete = 0;  // goal records missing, without a minute, or not adding up
    int not_covered = 0;       // competition and year without complete goal records (below)
    int aggregate_tie = 0;     // extra time or a shoot-out after an unlevel match: the second
                               // leg of a two-legged tie, whose first leg the source lacks
    int total() const noexcept {
        return no_result + unreadable + duplicates + goals_incomplete + not_covered + aggregate_tie;
    }
};

enum class SkipReason : std::uint8_t {
    no_result,
    unreadable,
    duplicate,
    goals_incomplete,
    not_covered,
    aggregate_tie,
};

// One match left out, with its day when the source gives a readable one.
struct LeftOutMatch {
    std::optional<int> day;
    SkipReason reason = SkipReason::no_result;
};

struct TimelinesRead {
    std::vector<MatchTimeline> matches;  // by date, then source order
    TimelineSkips skipped;               // every match left out, by reason
    std::vector<LeftOutMatch> left_out;  // the same matches, one by one
    int shootouts_without_tally = 0;     // shoot-outs whose kicks the source does not give

    // Counts a match left out (in `skipped` and `left_out`).
    void leave_out(std::optional<int> day, SkipReason reason);
    // The matches left out whose day lies in [from, to) (an open end: no limit); a match
    // without a readable day is counted in every window.
    TimelineSkips skips_between(std::optional<int> from, std::optional<int> to) const;
    // The matches taken whose day lies in [from, to).
    std::size_t taken_between(std::optional<int> from, std::optional<int> to) const;
};

struct InternationalSelection {
    // A goalless match has no goal records, so "its goals add up to its score" holds for every
    // 0-0 result, also in competitions whose goals were never recorded. Taking all of them, or
    // none, would bias the draw rate. So a competition's matches of a calendar year are taken
    // only when at least this share of its matches with goals have complete goal records; its
    // goalless matches are taken with them.
    double min_coverage = 0.9;
    BadRows bad_rows = BadRows::fail;  // an unreadable row of results.csv
};

// `dir` holds results.csv, goalscorers.csv and shootouts.csv. Throws std::runtime_error naming
// the file when one cannot be read or lacks a column.
TimelinesRead read_international_timelines(const std::string& dir,
                                           const InternationalSelection& selection = {});

// The rows of the international shoot-outs file (shootouts.csv), in file order: every
// shoot-out the source records, whether or not its match has complete goal records.
struct ShootoutRow {
    int day = 0;
    std::string home, away, winner;
    std::string first_shooter;  // empty when the source does not name it
};
std::vector<ShootoutRow> read_shootout_rows(const std::string& path);

// One championship file, in either layout (rounds of matches, or one list of matches; sides as
// names or as objects with a name; goal minutes as numbers with an "offset" or as text such as
// "90+4", the stoppage offset kept). Its matches are taken as played at neutral venues (the
// file names no venue) and its kick-off times as given.
TimelinesRead read_championship_timelines(const std::string& path);

}  // namespace liveprob::datasets
