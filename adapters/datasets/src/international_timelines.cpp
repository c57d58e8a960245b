#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <map>
#include <set>
#include <stdexcept>
#include <tuple>

#include "csv_reader.hpp"
#include "liveprob/datasets/match_timelines.hpp"
#include "liveprob/files/csv_line.hpp"
#include "liveprob/fit/calendar.hpp"
#include "liveprob/protocol/whole_file.hpp"
#include "timeline_checks.hpp"

namespace liveprob::datasets {
namespace {

using detail::CsvReader;
using MatchKey = std::tuple<int, std::string, std::string>;  // day, home, away

std::optional<int> whole_number(std::string_view s) {
    int v = 0;
    const auto [end, ec] = std::from_chars(s.data(), s.data() + s.size(), v);
    if (ec != std::errc() || end != s.data() + s.size() || v < 0) return std::nullopt;
    return v;
}

bool true_flag(std::string_view s) { return s == "TRUE" || s == "True" || s == "true" || s == "1"; }

struct GoalRecords {
    std::vector<TimelineGoal> goals;
    bool unusable = false;  // a goal without a minute, or credited to neither side
};

struct ShootoutRecord {
    std::string winner, first_shooter;
};

std::map<MatchKey, GoalRecords> read_goal_records(const std::string& path) {
    enum { date, home, away, team, minute, own_goal, penalty };
    CsvReader csv(path, "the goal scorers file",
                  {"date", "home_team", "away_team", "team", "minute", "own_goal", "penalty"});
    std::map<MatchKey, GoalRecords> out;
    csv.for_each_row([&](int, auto field) {
        const auto day = fit::parse_iso_date(field(date));
        if (!day) return;
        GoalRecords& records = out[{*day, std::string(field(home)), std::string(field(away))}];
        const auto m = whole_number(field(minute));
        const bool home_side = field(team) == field(home), away_side = field(team) == field(away);
        if (!m || *m < 1 || home_side == away_side) {
            records.unusable = true;
            return;
        }
        // The source puts a stoppage-time goal in the half's last minute: read 45 and 90 as the
        // first minute of stoppage ("45+1"), so no goal is shown before a bucket minute it may
        // have followed.
        const int stoppage = *m == 45 || *m == 90 ? 1 : 0;
        records.goals.push_back(
            TimelineGoal{*m, stoppage, home_side ? core::Side::home : core::Side::away,
                         true_flag(field(penalty)), true_flag(field(own_goal))});
    });
    return out;
}

std::map<MatchKey, ShootoutRecord> read_shootouts(const std::string& path) {
    std::map<MatchKey, ShootoutRecord> out;
    for (auto& row : read_shootout_rows(path))
        out[{row.day, row.home, row.away}] =
            ShootoutRecord{std::move(row.winner), std::move(row.first_shooter)};
    return out;
}

struct ResultRow {
    MatchTimeline timeline;
    std::array<int, 2> score{};
    std::string group;  // competition and year: the unit of goal-record coverage
};

std::optional<core::Side> side_named(const std::string& name, const MatchTimeline& m) {
    if (name == m.home) return core::Side::home;
    if (name == m.away) return core::Side::away;
    return std::nullopt;
}

}  // namespace

std::vector<ShootoutRow> read_shootout_rows(const std::string& path) {
    enum { date, home, away, winner, first_shooter };
    CsvReader csv(path, "the shoot-outs file",
                  {"date", "home_team", "away_team", "winner", "first_shooter"});
    std::vector<ShootoutRow> out;
    csv.for_each_row([&](int, auto field) {
        if (const auto day = fit::parse_iso_date(field(date))) {
            out.push_back({*day, std::string(field(home)), std::string(field(away)),
                           std::string(field(winner)), std::string(field(first_shooter))});
        }
    });
    return out;
}

TimelinesRead read_international_timelines(const std::string& dir,
                                           const InternationalSelection& selection) {
    const std::string results_path = dir + "/results.csv";
    const auto goals = read_goal_records(dir + "/goalscorers.csv");
    const auto shootouts = read_shootouts(dir + "/shootouts.csv");

    TimelinesRead out;
    std::vector<ResultRow> rows;
    {
        InternationalRows read = read_international_rows(results_path, selection.bad_rows);
        for (int i = 0; i < read.bad_skipped; ++i)
            out.leave_out(std::nullopt, SkipReason::unreadable);
        for (const int day : read.duplicate_days) out.leave_out(day, SkipReason::duplicate);
        for (const int day : read.unplayed_days) out.leave_out(day, SkipReason::no_result);
        for (auto& r : read.rows) {
            ResultRow row;
            MatchTimeline& t = row.timeline;
            t.day = r.result.day;
            t.home = std::move(r.result.home);
            t.away = std::move(r.result.away);
            t.neutral = r.result.neutral;
            t.competition = std::move(r.competition);
            t.origin = fmt::format("{}:{}", results_path, r.line);
            t.origin_number = static_cast<std::uint32_t>(r.line);
            row.score = {r.result.home_goals, r.result.away_goals};
            row.group = fmt::format("{}|{}", t.competition, fit::iso_date(t.day).substr(0, 4));
            rows.push_back(std::move(row));
        }
    }

    // Goal-record coverage of each competition and year, over its matches with goals.
    auto records_of = [&](const ResultRow& r) -> const GoalRecords* {
        const auto it = goals.find({r.timeline.day, r.timeline.home, r.timeline.away});
        return it == goals.end() ? nullptr : &it->second;
    };
    auto complete = [&](const ResultRow& r) {
        const GoalRecords* g = records_of(r);
        return g && !g->unusable && static_cast<int>(g->goals.size()) == r.score[0] + r.score[1];
    };
    std::map<std::string, std::array<int, 2>> coverage;  // group -> {with goals, complete}
    for (const auto& r : rows) {
        if (r.score[0] + r.score[1] == 0) continue;
        auto& c = coverage[r.group];
        ++c[0];
        if (complete(r)) ++c[1];
    }

    for (auto& r : rows) {
        const auto c = coverage.find(r.group);
        if (c == coverage.end() || c->second[1] < selection.min_coverage * c->second[0]) {
            out.leave_out(r.timeline.day, SkipReason::not_covered);
            continue;
        }
        MatchTimeline& t = r.timeline;
        if (const GoalRecords* g = records_of(r)) {
            if (g->unusable) {
                out.leave_out(t.day, SkipReason::goals_incomplete);
                continue;
            }
            t.goals = g->goals;
        }
        if (const auto s = shootouts.find({t.day, t.home, t.away}); s != shootouts.end()) {
            if (const auto winner = side_named(s->second.winner, t)) {
                t.shootout =
                    TimelineShootout{*winner, side_named(s->second.first_shooter, t), std::nullopt};
            }
        }
        const auto verdict = detail::finish_timeline(t, r.score, false);
        if (verdict != detail::TimelineVerdict::usable) {
            detail::count_skip(out, t.day, verdict);
            continue;
        }
        if (t.shootout) ++out.shootouts_without_tally;
        out.matches.push_back(std::move(t));
    }
    std::stable_sort(out.matches.begin(), out.matches.end(),
                     [](const MatchTimeline& a, const MatchTimeline& b) { return a.day < b.day; });
    return out;
}

}  // namespace liveprob::datasets
