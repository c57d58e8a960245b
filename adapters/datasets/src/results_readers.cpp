#include "liveprob/datasets/results_readers.hpp"

#include <fmt/format.h>
#include <simdjson.h>

#include <algorithm>
#include <charconv>
#include <set>
#include <stdexcept>
#include <tuple>

#include "liveprob/files/csv_line.hpp"
#include "liveprob/fit/calendar.hpp"
#include "liveprob/protocol/whole_file.hpp"

namespace liveprob::datasets {
namespace {

// Drops repeats of (day, home, away) and counts them.
class DuplicateFilter {
public:
    bool first_time(const fit::MatchResult& m) {
        return seen_.emplace(m.day, m.home, m.away).second;
    }

private:
    std::set<std::tuple<int, std::string, std::string>> seen_;
};

std::optional<int> whole_number(std::string_view s) {
    int v = 0;
    const auto [end, ec] = std::from_chars(s.data(), s.data() + s.size(), v);
    if (ec != std::errc() || end != s.data() + s.size()) return std::nullopt;
    return v;
}

std::optional<bool> flag(std::string_view s) {
    if (s == "1" || s == "true" || s == "TRUE" || s == "True") return true;
    if (s == "0" || s == "false" || s == "FALSE" || s == "False" || s.empty()) return false;
    return std::nullopt;
}

std::string first_line(const std::string& text) {
    const auto end = text.find_first_of("\r\n");
    return text.substr(0, end);
}

}  // namespace

ResultsRead read_project_results(const std::string& path) {
    const std::string text = protocol::read_whole_file(path, "the results file");
    ResultsRead out;
    DuplicateFilter filter;
    const std::vector<std::string> expected{"date",       "home",       "away",
                                            "home_goals", "away_goals", "neutral"};
    files::for_each_text_line(text, [&](int line, std::string_view view) {
        auto fail = [&](const std::string& why) {
            throw std::runtime_error(fmt::format("{}:{}: {}", path, line, why));
        };
        std::vector<std::string> f;
        try {
            f = files::split_csv_line(view);
        } catch (const std::exception& e) {
            fail(e.what());
        }
        if (line == 1) {
            const bool ok = (f.size() == 6 || (f.size() == 7 && f[6] == "competition")) &&
                            std::equal(expected.begin(), expected.end(), f.begin());
            if (!ok)
                fail("header must be date,home,away,home_goals,away_goals,neutral[,competition]");
            return;
        }
        if (f.size() != 6 && f.size() != 7)
            fail(fmt::format("expected 6 or 7 columns, found {}", f.size()));
        fit::MatchResult m;
        const auto day = fit::parse_iso_date(f[0]);
        if (!day) fail(fmt::format("date '{}' is not YYYY-MM-DD", f[0]));
        m.day = *day;
        m.home = f[1];
        m.away = f[2];
        if (m.home.empty() || m.away.empty()) fail("a team name is empty");
        if (m.home == m.away) fail(fmt::format("'{}' cannot play itself", m.home));
        const auto hg = whole_number(f[3]), ag = whole_number(f[4]);
        if (!hg || !ag || *hg < 0 || *ag < 0) fail("goals must be whole numbers >= 0");
        m.home_goals = *hg;
        m.away_goals = *ag;
        const auto neutral = flag(f[5]);
        if (!neutral) fail(fmt::format("neutral flag '{}' is not 0/1/true/false", f[5]));
        m.neutral = *neutral;
        if (filter.first_time(m)) out.matches.push_back(std::move(m));
        else ++out.duplicates;
    });
    if (text.empty()) throw std::runtime_error(fmt::format("{}: empty results file", path));
    return out;
}

ResultsRead read_international_results(const std::string& path) {
    const std::string text = protocol::read_whole_file(path, "the results file");
    ResultsRead out;
    DuplicateFilter filter;
    int c_date = -1, c_home = -1, c_away = -1, c_hs = -1, c_as = -1, c_neutral = -1;
    files::for_each_text_line(text, [&](int line, std::string_view view) {
        std::vector<std::string> f;
        try {
            f = files::split_csv_line(view);
        } catch (const std::exception& e) {
            throw std::runtime_error(fmt::format("{}:{}: {}", path, line, e.what()));
        }
        if (line == 1) {
            c_date = files::column_index(f, "date");
            c_home = files::column_index(f, "home_team");
            c_away = files::column_index(f, "away_team");
            c_hs = files::column_index(f, "home_score");
            c_as = files::column_index(f, "away_score");
            c_neutral = files::column_index(f, "neutral");
            if (std::min({c_date, c_home, c_away, c_hs, c_as, c_neutral}) < 0)
                throw std::runtime_error(
                    fmt::format("{}: header lacks a column of the international format", path));
            return;
        }
        auto at = [&](int c) -> std::string_view {
            return c < static_cast<int>(f.size()) ? std::string_view(f[static_cast<std::size_t>(c)])
                                                  : "";
        };
        const auto day = fit::parse_iso_date(at(c_date));
        const auto hg = whole_number(at(c_hs)), ag = whole_number(at(c_as));
        const auto neutral = flag(at(c_neutral));
        if (!day || !hg || !ag || !neutral || at(c_home).empty() || at(c_away).empty()) {
            ++out.skipped;
            return;
        }
        fit::MatchResult m{*day,    std::string(at(c_home)), std::string(at(c_away)), *hg, *ag,
                           *neutral};
        if (filter.first_time(m)) out.matches.push_back(std::move(m));
        else ++out.duplicates;
    });
    return out;
}

ResultsRead read_league_json(const std::string& path) {
    const std::string text = protocol::read_whole_file(path, "the league file");
    simdjson::dom::parser parser;
    simdjson::dom::element root;
    if (auto e = parser.parse(text).get(root); e != simdjson::SUCCESS)
        throw std::runtime_error(
            fmt::format("{}: not valid JSON: {}", path, simdjson::error_message(e)));
    simdjson::dom::array list;
    if (root["matches"].get_array().get(list) != simdjson::SUCCESS)
        throw std::runtime_error(fmt::format("{}: no \"matches\" array", path));
    ResultsRead out;
    DuplicateFilter filter;
    for (simdjson::dom::element match : list) {
        std::string_view date, home, away;
        simdjson::dom::array ft;
        int64_t hg = -1, ag = -1;
        const bool ok = match["date"].get_string().get(date) == simdjson::SUCCESS &&
                        match["team1"].get_string().get(home) == simdjson::SUCCESS &&
                        match["team2"].get_string().get(away) == simdjson::SUCCESS &&
                        match["score"]["ft"].get_array().get(ft) == simdjson::SUCCESS &&
                        ft.size() == 2 && ft.at(0).get_int64().get(hg) == simdjson::SUCCESS &&
                        ft.at(1).get_int64().get(ag) == simdjson::SUCCESS;
        const auto day = ok ? fit::parse_iso_date(date) : std::nullopt;
        if (!ok || !day || hg < 0 || ag < 0 || hg > 99 || ag > 99 || home == away) {
            ++out.skipped;
            continue;
        }
        fit::MatchResult m{
            *day, std::string(home), std::string(away), static_cast<int>(hg), static_cast<int>(ag),
            false};
        if (filter.first_time(m)) out.matches.push_back(std::move(m));
        else ++out.duplicates;
    }
    return out;
}

ResultsRead read_results_any(const std::string& path) {
    if (path.size() >= 5 && path.compare(path.size() - 5, 5, ".json") == 0)
        return read_league_json(path);
    const std::string head = first_line(protocol::read_whole_file(path, "the results file"));
    if (head.rfind("date,home_team", 0) == 0) return read_international_results(path);
    return read_project_results(path);
}

}  // namespace liveprob::datasets
