#include "liveprob/datasets/league_record.hpp"

#include <fmt/format.h>
#include <simdjson.h>

#include <algorithm>
#include <cctype>
#include <filesystem>
#include <set>
#include <stdexcept>
#include <tuple>

#include "championship_format.hpp"
#include "liveprob/fit/calendar.hpp"
#include "liveprob/protocol/whole_file.hpp"

namespace liveprob::datasets {
namespace {

namespace fs = std::filesystem;
using simdjson::dom::element;

// ---- names ----------------------------------------------------------------------------------

struct Word {
    std::string text;          // lower case (ASCII letters), without a trailing '.'
    bool abbreviated = false;  // written with a trailing '.': stands for a word it begins
};

// Words of a side's name that tell sides apart: without club-form abbreviations (upper-case
// words of up to five letters), numbers (founding years, "1."), and the words for "of", "the",
// "club" and "football" (the project's list).
std::vector<Word> telling_words(const std::string& name) {
    static const std::set<std::string> generic{"de",     "di",     "la",       "le",      "club",
                                               "calcio", "fútbol", "balompié", "football"};
    std::vector<Word> out;
    std::string token;
    auto finish = [&] {
        if (token.empty()) return;
        Word w;
        w.abbreviated = token.back() == '.';
        while (!token.empty() && token.back() == '.') token.pop_back();
        const bool upper =
            !token.empty() && token.size() <= 5 &&
            std::all_of(token.begin(), token.end(), [](char c) { return c >= 'A' && c <= 'Z'; });
        const bool number = !token.empty() && std::all_of(token.begin(), token.end(), [](char c) {
            return c >= '0' && c <= '9';
        });
        for (char& c : token)
            if (c >= 'A' && c <= 'Z') c = static_cast<char>(c - 'A' + 'a');
        if (!token.empty() && !upper && !number && !generic.contains(token)) {
            w.text = token;
            out.push_back(std::move(w));
        }
        token.clear();
    };
    for (const char c : name) {
        if (c == ' ' || c == '-') finish();
        else token += c;
    }
    finish();
    return out;
}

bool word_matches(const Word& a, const Word& b) {
    if (a.text == b.text) return true;
    // An abbreviation, or a short form of four letters or more, stands for a word it begins.
    return (a.abbreviated || a.text.size() >= 4) && b.text.size() > a.text.size() &&
           b.text.compare(0, a.text.size(), a.text) == 0;
}

// Every word of `a` matches a word of `b`.
bool contained(const std::vector<Word>& a, const std::vector<Word>& b) {
    return !a.empty() && std::all_of(a.begin(), a.end(), [&](const Word& w) {
        return std::any_of(b.begin(), b.end(), [&](const Word& v) { return word_matches(w, v); });
    });
}

// ---- one file --------------------------------------------------------------------------------

struct FileMatch {
    int day = 0;
    std::optional<int> kickoff_minute;
    std::string home, away;  // spellings of the file
    std::optional<std::array<int, 2>> ht, ft;
    bool awarded = false, not_played = false;
    std::uint32_t position = 0;
    std::string origin;
};

std::vector<FileMatch> read_file(const std::string& path) {
    const std::string text = protocol::read_whole_file(path, "the league file");
    simdjson::dom::parser parser;
    element root;
    if (auto e = parser.parse(text).get(root); e != simdjson::SUCCESS)
        throw std::runtime_error(
            fmt::format("{}: not valid JSON: {}", path, simdjson::error_message(e)));
    std::vector<FileMatch> out;
    std::uint32_t position = 0;
    for (element m : detail::championship_matches(root, path)) {
        FileMatch f;
        f.position = ++position;
        f.origin = fmt::format("{}: match {}", path, position);
        std::string_view date, time, status;
        if (m["date"].get_string().get(date) != simdjson::SUCCESS)
            throw std::runtime_error(f.origin + ": no date");
        const auto day = fit::parse_iso_date(date);
        if (!day)
            throw std::runtime_error(
                fmt::format("{}: date '{}' is not YYYY-MM-DD", f.origin, date));
        f.day = *day;
        if (m["time"].get_string().get(time) == simdjson::SUCCESS)
            f.kickoff_minute = detail::clock_time(time);
        const auto home = detail::side_name(m["team1"]), away = detail::side_name(m["team2"]);
        if (!home || !away || home->empty() || away->empty() || *home == *away)
            throw std::runtime_error(f.origin + ": team1 and team2 must be two different names");
        f.home = *home;
        f.away = *away;
        if (m["status"].get_string().get(status) == simdjson::SUCCESS) {
            f.awarded = status == "awarded";
            f.not_played = status == "cancelled" || status == "postponed" || status == "abandoned";
        }
        const element score = m["score"];
        for (auto [key, slot] : {std::pair{"ht", &f.ht}, std::pair{"ft", &f.ft}}) {
            if (score[key].error() != simdjson::SUCCESS) continue;
            *slot = detail::score_pair(score, key);
            if (!*slot)
                throw std::runtime_error(fmt::format(
                    "{}: score.{} is not a pair of whole numbers 0..99", f.origin, key));
        }
        if (f.ht && f.ft && ((*f.ht)[0] > (*f.ft)[0] || (*f.ht)[1] > (*f.ft)[1]))
            throw std::runtime_error(f.origin + ": half-time score above the final score");
        out.push_back(std::move(f));
    }
    return out;
}

// First year of a season folder named "2010-11" (or "2010"); nullopt otherwise.
std::optional<int> season_year(const std::string& season) {
    if (season.size() < 4 || !std::all_of(season.begin(), season.begin() + 4,
                                          [](char c) { return c >= '0' && c <= '9'; }))
        return std::nullopt;
    return std::stoi(season.substr(0, 4));
}

}  // namespace

bool could_be_renamed(const std::string& older, const std::string& newer, bool consecutive) {
    const auto a = telling_words(older), b = telling_words(newer);
    if (consecutive) return contained(a, b) || contained(b, a);
    const bool equal = contained(a, b) && contained(b, a);
    const auto& shorter = a.size() <= b.size() ? a : b;
    const auto& longer = a.size() <= b.size() ? b : a;
    return equal || (shorter.size() >= 2 && contained(shorter, longer));
}

const std::vector<std::string>* LeagueRecord::stand_ins(const std::string& league,
                                                        const std::string& season,
                                                        const std::string& side) const {
    for (const auto& n : newcomers)
        if (n.league == league && n.season == season && n.name == side) return &n.stand_ins;
    return nullptr;
}

LeagueRecord read_league_folder(const std::string& dir,
                                const std::map<std::string, std::string>& aliases) {
    if (!fs::is_directory(dir)) throw std::runtime_error(dir + ": not a folder");
    std::vector<std::string> seasons;
    std::set<std::string> leagues;
    for (const auto& entry : fs::directory_iterator(dir)) {
        if (!entry.is_directory()) continue;
        seasons.push_back(entry.path().filename().string());
        for (const auto& file : fs::directory_iterator(entry.path()))
            if (file.path().extension() == ".json") leagues.insert(file.path().stem().string());
    }
    std::sort(seasons.begin(), seasons.end());
    LeagueRecord out;
    out.leagues.assign(leagues.begin(), leagues.end());
    if (out.leagues.empty()) throw std::runtime_error(dir + ": no SEASON/LEAGUE.json files");

    std::set<std::string> settled;
    for (const auto& [spelling, name] : aliases) settled.insert(name);
    for (const auto& league : out.leagues) {
        std::map<std::string, std::string> canonical;      // spelling -> the league's name
        std::map<std::string, std::string> last_spelling;  // name -> latest spelling
        std::set<std::string> previous;                    // names of the season before
        std::set<std::string> seen;                        // names ever in the league
        bool first_season = true;
        for (const auto& season : seasons) {
            const fs::path path = fs::path(dir) / season / (league + ".json");
            if (!fs::exists(path)) continue;
            auto file = read_file(path.string());
            for (auto& m : file) {
                for (std::string* side : {&m.home, &m.away})
                    if (const auto it = aliases.find(*side); it != aliases.end())
                        *side = it->second;
            }
            // Names of this season: known spellings first, then the new ones in order.
            std::set<std::string> spellings, present;
            for (const auto& m : file) {
                spellings.insert(m.home);
                spellings.insert(m.away);
            }
            std::vector<std::string> unknown;
            for (const auto& s : spellings) {
                if (const auto it = canonical.find(s); it != canonical.end())
                    present.insert(it->second);
                else unknown.push_back(s);
            }
            for (const auto& s : unknown) {
                std::vector<std::string> candidates;
                // A name an alias gives is settled: it is its own team, renamed from nothing.
                for (const auto& name : settled.contains(s) ? std::set<std::string>{} : seen) {
                    if (present.contains(name)) continue;
                    if (could_be_renamed(last_spelling.at(name), s, previous.contains(name)))
                        candidates.push_back(name);
                }
                if (candidates.size() == 1) {
                    out.renames.push_back({league, season, last_spelling.at(candidates[0]), s});
                    canonical[s] = candidates[0];
                } else {
                    canonical[s] = s;
                }
                present.insert(canonical[s]);
                last_spelling[canonical[s]] = s;
            }
            for (const auto& s : spellings) last_spelling[canonical.at(s)] = s;
            if (!first_season) {
                std::vector<std::string> left;
                for (const auto& name : previous)
                    if (!present.contains(name)) left.push_back(name);
                for (const auto& name : present)
                    if (!previous.contains(name))
                        out.newcomers.push_back({league, season, name, left});
            }
            // The season's matches.
            const auto year = season_year(season);
            std::set<std::tuple<int, std::string, std::string>> fixtures;
            std::map<std::string, std::vector<std::pair<int, const FileMatch*>>> days_of_side;
            for (auto& m : file) {
                m.home = canonical.at(m.home);
                m.away = canonical.at(m.away);
                auto& c = out.checks;
                if (!m.ft || m.not_played) {
                    ++c.not_played;
                    continue;
                }
                if (m.awarded) {
                    ++c.awarded;
                    continue;
                }
                if (!fixtures.emplace(m.day, m.home, m.away).second) {
                    ++c.duplicates;
                    continue;
                }
                ++c.played;
                if (year && (m.day < fit::day_number(*year, 7, 1) ||
                             m.day > fit::day_number(*year + 1, 8, 31))) {
                    ++c.outside_season;
                    c.date_problems.push_back(fmt::format("{}: dated {}, outside the season",
                                                          m.origin, fit::iso_date(m.day)));
                }
                days_of_side[m.home].push_back({m.day, &m});
                days_of_side[m.away].push_back({m.day, &m});
                out.results[league].push_back(
                    {m.day, m.home, m.away, (*m.ft)[0], (*m.ft)[1], false});
                if (!m.ht) {
                    if (*m.ft == std::array<int, 2>{0, 0}) {
                        ++c.half_time_inferred;
                        m.ht = std::array<int, 2>{0, 0};
                    } else {
                        ++c.half_time_missing;
                        continue;
                    }
                }
                MatchTimeline t;
                t.day = m.day;
                t.kickoff_minute = m.kickoff_minute;
                t.home = m.home;
                t.away = m.away;
                t.competition = league;
                t.origin = m.origin;
                t.origin_number = m.position;
                t.goal_minutes_known = false;
                for (std::size_t s = 0; s < 2; ++s) {
                    const auto side = s == 0 ? core::Side::home : core::Side::away;
                    for (int g = 0; g < (*m.ht)[s]; ++g)
                        t.goals.push_back({45, 0, side, false, false});
                    for (int g = (*m.ht)[s]; g < (*m.ft)[s]; ++g)
                        t.goals.push_back({90, 0, side, false, false});
                }
                std::stable_sort(t.goals.begin(), t.goals.end(),
                                 [](const auto& a, const auto& b) { return a.minute < b.minute; });
                t.regulation_goals = *m.ft;
                out.matches.push_back(std::move(t));
                out.match_season.push_back(season);
            }
            for (auto& [side, days] : days_of_side) {
                std::sort(days.begin(), days.end(),
                          [](const auto& a, const auto& b) { return a.first < b.first; });
                for (std::size_t i = 1; i < days.size(); ++i) {
                    if (days[i].first - days[i - 1].first > 1) continue;
                    out.checks.side_twice_in_a_day += 1;
                    out.checks.date_problems.push_back(fmt::format(
                        "{} and {}: one side twice within a day ({}, {})",
                        days[i - 1].second->origin, days[i].second->origin,
                        fit::iso_date(days[i - 1].first), fit::iso_date(days[i].first)));
                }
            }
            seen.insert(present.begin(), present.end());
            previous = std::move(present);
            first_season = false;
        }
        auto& results = out.results[league];
        std::stable_sort(results.begin(), results.end(),
                         [](const auto& a, const auto& b) { return a.day < b.day; });
    }
    // All leagues' matches by date (seasons kept beside them).
    std::vector<std::size_t> order(out.matches.size());
    for (std::size_t i = 0; i < order.size(); ++i) order[i] = i;
    std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) {
        return out.matches[a].day < out.matches[b].day;
    });
    std::vector<MatchTimeline> matches;
    std::vector<std::string> match_season;
    for (const std::size_t i : order) {
        matches.push_back(std::move(out.matches[i]));
        match_season.push_back(std::move(out.match_season[i]));
    }
    out.matches = std::move(matches);
    out.match_season = std::move(match_season);
    return out;
}

}  // namespace liveprob::datasets
