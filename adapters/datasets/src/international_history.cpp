#include "liveprob/datasets/international_history.hpp"

#include <charconv>
#include <set>
#include <tuple>

#include "csv_reader.hpp"
#include "liveprob/fit/calendar.hpp"

namespace liveprob::datasets {
namespace {

std::optional<int> count(std::string_view s) {
    int v = 0;
    const auto [end, ec] = std::from_chars(s.data(), s.data() + s.size(), v);
    if (ec != std::errc() || end != s.data() + s.size() || v < 0) return std::nullopt;
    return v;
}

}  // namespace

InternationalHistory read_international_history(const std::string& dir) {
    InternationalHistory out;
    {
        enum { date, home, away, home_score, away_score, tournament, neutral };
        detail::CsvReader csv(dir + "/results.csv", "the results file",
                              {"date", "home_team", "away_team", "home_score", "away_score",
                               "tournament", "neutral"});
        std::set<std::tuple<int, std::string, std::string>> seen;
        csv.for_each_row([&](int line, auto field) {
            const auto day = fit::parse_iso_date(field(date));
            const auto hs = count(field(home_score)), as = count(field(away_score));
            if (!day || !hs || !as || field(home).empty() || field(away).empty()) {
                ++out.skipped;
                return;
            }
            CompetitionResult r;
            r.result = {*day,
                        std::string(field(home)),
                        std::string(field(away)),
                        *hs,
                        *as,
                        field(neutral) == "TRUE" || field(neutral) == "True" ||
                            field(neutral) == "true" || field(neutral) == "1"};
            r.competition = field(tournament);
            r.line = line;
            if (!seen.emplace(r.result.day, r.result.home, r.result.away).second) {
                ++out.duplicates;
                return;
            }
            out.results.push_back(std::move(r));
        });
    }
    enum { date, minute };
    detail::CsvReader csv(dir + "/goalscorers.csv", "the goal scorers file", {"date", "minute"});
    csv.for_each_row([&](int, auto field) {
        const auto day = fit::parse_iso_date(field(date));
        const auto m = count(field(minute));
        if (day && m && *m >= 1 && *m <= 90) out.goal_minutes.push_back({*day, *m});
    });
    return out;
}

}  // namespace liveprob::datasets
