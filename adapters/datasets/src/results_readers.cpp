#include "liveprob/datasets/results_readers.hpp"

#include <fmt/format.h>
#include <simdjson.h>

#include <algorithm>
#include <charconv>
#include <set>
#include <stdexcept>
#include <tuple>

#include "championship_format.hpp"
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

// A row that cannot be read: thrown as an error naming the file and line, or counted.
struct BadRow : std::runtime_error {
    using std::runtime_error::runtime_error;
};

// Runs `read` for one row; a BadRow it throws is an error naming `where` (BadRows::fail) or
// counted in `skipped` (BadRows::skip).
template <typename Read>
void guarded_row(BadRows policy, const std::string& where, int& skipped, Read&& read) {
    try {
        read();
    } catch (const BadRow& e) {
        if (policy == BadRows::fail)
            throw std::runtime_error(fmt::format("{}: {}", where, e.what()));
        ++skipped;
    }
}

// A whole number of goals >= 0, or a BadRow naming the column.
int goals_field(std::string_view text, const char* column) {
    const auto v = whole_number(text);
    if (!v) throw BadRow(fmt::format("{} '{}' is not a whole number", column, text));
    if (*v < 0) throw BadRow(fmt::format("{} {} is negative", column, *v));
    return *v;
}

int date_field(std::string_view text) {
    const auto day = fit::parse_iso_date(text);
    if (!day) throw BadRow(fmt::format("date '{}' is not YYYY-MM-DD", text));
    return *day;
}

// A status under which the file's score, if any, is not the result of a match played.
bool not_played_status(simdjson::dom::element match) {
    std::string_view status;
    if (match["status"].get_string().get(status) != simdjson::SUCCESS) return false;
    return status == "cancelled" || status == "awarded" || status == "postponed" ||
           status == "abandoned";
}

simdjson::dom::element parse_json(simdjson::dom::parser& parser, const std::string& text,
                                  const std::string& path) {
    simdjson::dom::element root;
    if (auto e = parser.parse(text).get(root); e != simdjson::SUCCESS)
        throw std::runtime_error(
            fmt::format("{}: not valid JSON: {}", path, simdjson::error_message(e)));
    return root;
}

}  // namespace

InternationalRows read_international_rows(const std::string& path, BadRows bad) {
    const std::string text = protocol::read_whole_file(path, "the results file");
    InternationalRows out;
    DuplicateFilter filter;
    int c_date = -1, c_home = -1, c_away = -1, c_hs = -1, c_as = -1, c_tournament = -1,
        c_neutral = -1;
    std::size_t columns = 0;
    files::for_each_text_line(text, [&](int line, std::string_view view) {
        const std::string where = fmt::format("{}:{}", path, line);
        std::vector<std::string> f;
        try {
            f = files::split_csv_line(view);
        } catch (const std::exception& e) {
            if (bad == BadRows::fail || line == 1)
                throw std::runtime_error(fmt::format("{}: {}", where, e.what()));
            ++out.bad_skipped;
            return;
        }
        if (line == 1) {
            c_date = files::column_index(f, "date");
            c_home = files::column_index(f, "home_team");
            c_away = files::column_index(f, "away_team");
            c_hs = files::column_index(f, "home_score");
            c_as = files::column_index(f, "away_score");
            c_tournament = files::column_index(f, "tournament");
            c_neutral = files::column_index(f, "neutral");
            if (std::min({c_date, c_home, c_away, c_hs, c_as, c_tournament, c_neutral}) < 0)
                throw std::runtime_error(
                    fmt::format("{}: header lacks a column of the international format", path));
            columns = f.size();
            return;
        }
        guarded_row(bad, where, out.bad_skipped, [&] {
            if (f.size() != columns)
                throw BadRow(fmt::format("{} columns, the header has {}", f.size(), columns));
            auto at = [&](int c) -> std::string_view { return f[static_cast<std::size_t>(c)]; };
            const int day = date_field(at(c_date));
            if (at(c_hs) == "NA" && at(c_as) == "NA") {  // a fixture not yet played
                ++out.unplayed;
                out.unplayed_days.push_back(day);
                return;
            }
            CompetitionResult r;
            r.result.day = day;
            r.result.home = at(c_home);
            r.result.away = at(c_away);
            if (r.result.home.empty() || r.result.away.empty())
                throw BadRow("a team name is empty");
            r.result.home_goals = goals_field(at(c_hs), "home_score");
            r.result.away_goals = goals_field(at(c_as), "away_score");
            const auto neutral = flag(at(c_neutral));
            if (!neutral)
                throw BadRow(fmt::format("neutral '{}' is not TRUE/FALSE", at(c_neutral)));
            r.result.neutral = *neutral;
            r.competition = at(c_tournament);
            r.result.friendly = r.competition == "Friendly";
            r.line = line;
            if (filter.first_time(r.result)) {
                out.rows.push_back(std::move(r));
            } else {
                ++out.duplicates;
                out.duplicate_days.push_back(day);
            }
        });
    });
    if (columns == 0) throw std::runtime_error(fmt::format("{}: empty results file", path));
    return out;
}

ResultsRead read_project_results(const std::string& path, BadRows bad) {
    const std::string text = protocol::read_whole_file(path, "the results file");
    ResultsRead out;
    DuplicateFilter filter;
    const std::vector<std::string> expected{"date",       "home",       "away",
                                            "home_goals", "away_goals", "neutral"};
    files::for_each_text_line(text, [&](int line, std::string_view view) {
        const std::string where = fmt::format("{}:{}", path, line);
        std::vector<std::string> f;
        try {
            f = files::split_csv_line(view);
        } catch (const std::exception& e) {
            if (bad == BadRows::fail || line == 1)
                throw std::runtime_error(fmt::format("{}: {}", where, e.what()));
            ++out.bad_skipped;
            return;
        }
        if (line == 1) {
            const bool ok = (f.size() == 6 || (f.size() == 7 && f[6] == "competition")) &&
                            std::equal(expected.begin(), expected.end(), f.begin());
            if (!ok)
                throw std::runtime_error(fmt::format(
                    "{}: header must be date,home,away,home_goals,away_goals,neutral[,competition]",
                    where));
            return;
        }
        guarded_row(bad, where, out.bad_skipped, [&] {
            if (f.size() != 6 && f.size() != 7)
                throw BadRow(fmt::format("expected 6 or 7 columns, found {}", f.size()));
            fit::MatchResult m;
            m.day = date_field(f[0]);
            m.home = f[1];
            m.away = f[2];
            if (m.home.empty() || m.away.empty()) throw BadRow("a team name is empty");
            if (m.home == m.away) throw BadRow(fmt::format("'{}' cannot play itself", m.home));
            m.home_goals = goals_field(f[3], "home_goals");
            m.away_goals = goals_field(f[4], "away_goals");
            const auto neutral = flag(f[5]);
            if (!neutral)
                throw BadRow(fmt::format("neutral flag '{}' is not 0/1/true/false", f[5]));
            m.neutral = *neutral;
            if (filter.first_time(m)) out.matches.push_back(std::move(m));
            else ++out.duplicates;
        });
    });
    if (text.empty()) throw std::runtime_error(fmt::format("{}: empty results file", path));
    return out;
}

ResultsRead read_international_results(const std::string& path, BadRows bad) {
    InternationalRows rows = read_international_rows(path, bad);
    ResultsRead out;
    out.matches.reserve(rows.rows.size());
    for (auto& r : rows.rows) out.matches.push_back(std::move(r.result));
    out.skipped = rows.unplayed;
    out.bad_skipped = rows.bad_skipped;
    out.duplicates = rows.duplicates;
    return out;
}

ResultsRead read_league_json(const std::string& path, BadRows bad) {
    const std::string text = protocol::read_whole_file(path, "the league file");
    simdjson::dom::parser parser;
    const simdjson::dom::element root = parse_json(parser, text, path);
    simdjson::dom::array list;
    if (root["matches"].get_array().get(list) != simdjson::SUCCESS)
        throw std::runtime_error(fmt::format("{}: no \"matches\" array", path));
    ResultsRead out;
    DuplicateFilter filter;
    int number = 0;
    for (simdjson::dom::element match : list) {
        ++number;
        guarded_row(bad, fmt::format("{}: match {}", path, number), out.bad_skipped, [&] {
            std::string_view date, home, away;
            if (match["date"].get_string().get(date) != simdjson::SUCCESS) throw BadRow("no date");
            const int day = date_field(date);
            if (match["team1"].get_string().get(home) != simdjson::SUCCESS ||
                match["team2"].get_string().get(away) != simdjson::SUCCESS || home.empty() ||
                away.empty() || home == away) {
                throw BadRow("team1 and team2 must be two different names");
            }
            if (match["score"]["ft"].error() != simdjson::SUCCESS || not_played_status(match)) {
                ++out.skipped;  // not played (yet), or a result given at a desk
                return;
            }
            const auto ft = detail::score_pair(match["score"], "ft");
            if (!ft) throw BadRow("score.ft is not a pair of whole numbers 0..99");
            fit::MatchResult m{day,      std::string(home), std::string(away),
                               (*ft)[0], (*ft)[1],          false};
            if (filter.first_time(m)) out.matches.push_back(std::move(m));
            else ++out.duplicates;
        });
    }
    return out;
}

ResultsRead read_championship_results(const std::string& path) {
    const std::string text = protocol::read_whole_file(path, "the championship file");
    simdjson::dom::parser parser;
    const simdjson::dom::element root = parse_json(parser, text, path);
    ResultsRead out;
    DuplicateFilter filter;
    for (simdjson::dom::element m : detail::championship_matches(root, path)) {
        std::string_view date;
        const auto home = detail::side_name(m["team1"]), away = detail::side_name(m["team2"]);
        const auto ft = detail::score_pair(m["score"], "ft");
        const auto et = detail::score_pair(m["score"], "et");
        const auto day = m["date"].get_string().get(date) == simdjson::SUCCESS
                             ? fit::parse_iso_date(date)
                             : std::nullopt;
        if (!day || !home || !away || home->empty() || away->empty() || *home == *away || !ft ||
            not_played_status(m)) {
            ++out.skipped;
            continue;
        }
        const auto final_score = et.value_or(*ft);  // after extra time when it was played
        fit::MatchResult r{*day,           std::string(*home), std::string(*away),
                           final_score[0], final_score[1],     true};
        if (filter.first_time(r)) out.matches.push_back(std::move(r));
        else ++out.duplicates;
    }
    return out;
}

ResultsRead read_results_any(const std::string& path, BadRows bad) {
    if (path.size() >= 5 && path.compare(path.size() - 5, 5, ".json") == 0) {
        const std::string text = protocol::read_whole_file(path, "the results file");
        simdjson::dom::parser parser;
        if (detail::looks_like_championship(parse_json(parser, text, path)))
            return read_championship_results(path);
        return read_league_json(path, bad);
    }
    const std::string head = first_line(protocol::read_whole_file(path, "the results file"));
    if (head.rfind("date,home_team", 0) == 0) return read_international_results(path, bad);
    return read_project_results(path, bad);
}

int append_new_results(std::vector<fit::MatchResult>& into,
                       std::span<const fit::MatchResult> more) {
    // day, then the two names in alphabetical order
    std::set<std::tuple<int, std::string, std::string>> held;
    auto key = [](const fit::MatchResult& m) {
        return std::make_tuple(m.day, std::min(m.home, m.away), std::max(m.home, m.away));
    };
    for (const auto& m : into) held.insert(key(m));
    int repeated = 0;
    for (const auto& m : more) {
        if (held.insert(key(m)).second) into.push_back(m);
        else ++repeated;
    }
    return repeated;
}

}  // namespace liveprob::datasets
