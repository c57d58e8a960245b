#include "liveprob/backtest/elo_reference.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <numeric>
#include <stdexcept>
#include <string>
#include <unordered_map>

#include "liveprob/fit/calendar.hpp"

namespace liveprob::backtest {

EloMatchClass elo_match_class(std::string_view competition,
                              std::string_view world_finals) noexcept {
    if (competition == "Friendly") return EloMatchClass::friendly;
    if (competition.find("qualification") != std::string_view::npos)
        return EloMatchClass::qualifier;
    if (!world_finals.empty() && competition == world_finals) return EloMatchClass::world_finals;
    return EloMatchClass::tournament;
}

std::string world_finals_in(std::span<const std::string> competitions) {
    constexpr std::string_view suffix = " qualification";
    std::map<std::string, std::size_t> qualifying;
    for (const auto& c : competitions)
        if (c.size() > suffix.size() && c.ends_with(suffix))
            ++qualifying[c.substr(0, c.size() - suffix.size())];
    std::string best;
    std::size_t most = 0;
    for (const auto& [name, count] : qualifying)
        if (count > most) {
            best = name;
            most = count;
        }
    return best;
}

double elo_expected_result(double rating_difference) noexcept {
    return 1.0 / (std::pow(10.0, -rating_difference / 400.0) + 1.0);
}

double elo_goal_multiplier(int goal_difference) noexcept {
    const int n = std::abs(goal_difference);
    if (n <= 1) return 1.0;
    if (n == 2) return 1.5;
    return (11.0 + n) / 8.0;
}

double elo_points_exchanged(double rating_difference, int home_goals, int away_goals,
                            double k) noexcept {
    const double w = home_goals > away_goals ? 1.0 : home_goals == away_goals ? 0.5 : 0.0;
    return k * elo_goal_multiplier(home_goals - away_goals) *
           (w - elo_expected_result(rating_difference));
}

std::array<double, 2> EloGoalsMap::expected(double rating_difference) const noexcept {
    const double x = rating_difference / 400.0;
    return {std::exp(home_intercept + home_slope * x), std::exp(away_intercept + away_slope * x)};
}

namespace {

// Poisson regression of y on (1, x) by Newton's method from (log mean, 0).
std::array<double, 2> poisson_line(std::span<const double> x, std::span<const int> y) {
    double mean = 0.0;
    for (const int v : y) mean += v;
    mean /= static_cast<double>(y.size());
    std::array<double, 2> b{std::log(std::max(mean, 1e-3)), 0.0};
    for (int iteration = 0; iteration < 100; ++iteration) {
        double g0 = 0, g1 = 0, h00 = 0, h01 = 0, h11 = 0;
        for (std::size_t i = 0; i < x.size(); ++i) {
            const double mu = std::exp(b[0] + b[1] * x[i]);
            g0 += y[i] - mu;
            g1 += (y[i] - mu) * x[i];
            h00 += mu;
            h01 += mu * x[i];
            h11 += mu * x[i] * x[i];
        }
        const double det = h00 * h11 - h01 * h01;
        const double s0 = (h11 * g0 - h01 * g1) / det, s1 = (h00 * g1 - h01 * g0) / det;
        b[0] += s0;
        b[1] += s1;
        if (std::max(std::abs(s0), std::abs(s1)) < 1e-12) break;
    }
    return b;
}

int year_of(int day) { return std::stoi(fit::iso_date(day).substr(0, 4)); }

}  // namespace

EloGoalsMap fit_elo_goals_map(std::span<const double> rating_difference,
                              std::span<const int> home_goals, std::span<const int> away_goals) {
    if (rating_difference.size() < 10)
        throw std::runtime_error("Elo goals map: fewer than 10 results to fit on");
    std::vector<double> x(rating_difference.begin(), rating_difference.end());
    for (auto& v : x) v /= 400.0;
    const auto h = poisson_line(x, home_goals), a = poisson_line(x, away_goals);
    return {h[0], h[1], a[0], a[1], x.size()};
}

std::array<double, scoring::kBuckets> remaining_share(const std::array<double, 90>& histogram) {
    const double total = std::accumulate(histogram.begin(), histogram.end(), 0.0);
    std::array<double, scoring::kBuckets> out{};
    for (int b = 0; b < scoring::kBuckets; ++b) {
        const int seen = kMinutesSeenAtBucket[static_cast<std::size_t>(b)];
        const double passed = std::accumulate(histogram.begin(), histogram.begin() + seen, 0.0);
        out[static_cast<std::size_t>(b)] = total > 0 ? 1.0 - passed / total : 0.0;
    }
    return out;
}

EloReference elo_reference(std::span<const EloResult> results,
                           std::span<const GoalMinute> goal_minutes,
                           std::span<const EloFixture> fixtures, const EloSettings& settings) {
    EloReference out;
    out.means.resize(fixtures.size());
    out.rating_difference.resize(fixtures.size());

    // Every result's own pre-match difference (for the goals map), and every fixture's: one walk
    // through the days, pricing a day's results and fixtures before applying its results.
    std::vector<std::size_t> by_day(results.size()), fixtures_by_day(fixtures.size());
    std::iota(by_day.begin(), by_day.end(), 0);
    std::iota(fixtures_by_day.begin(), fixtures_by_day.end(), 0);
    std::stable_sort(by_day.begin(), by_day.end(), [&](std::size_t a, std::size_t b) {
        return results[a].result.day < results[b].result.day;
    });
    std::stable_sort(
        fixtures_by_day.begin(), fixtures_by_day.end(),
        [&](std::size_t a, std::size_t b) { return fixtures[a].day < fixtures[b].day; });
    std::unordered_map<std::string, double> rating;
    auto rating_of = [&](const std::string& team) {
        const auto it = rating.find(team);
        return it == rating.end() ? settings.start_rating : it->second;
    };
    auto difference = [&](const std::string& home, const std::string& away, bool neutral) {
        return rating_of(home) - rating_of(away) + (neutral ? 0.0 : settings.home_advantage);
    };
    std::vector<double> result_difference(results.size());
    std::size_t r = 0, f = 0;
    while (r < by_day.size() || f < fixtures_by_day.size()) {
        const int day = std::min(
            r < by_day.size() ? results[by_day[r]].result.day : std::numeric_limits<int>::max(),
            f < fixtures_by_day.size() ? fixtures[fixtures_by_day[f]].day
                                       : std::numeric_limits<int>::max());
        for (; f < fixtures_by_day.size() && fixtures[fixtures_by_day[f]].day == day; ++f) {
            const auto& fx = fixtures[fixtures_by_day[f]];
            out.rating_difference[fixtures_by_day[f]] = difference(fx.home, fx.away, fx.neutral);
        }
        std::unordered_map<std::string, double> change;
        for (; r < by_day.size() && results[by_day[r]].result.day == day; ++r) {
            const auto& m = results[by_day[r]];
            const double dr = difference(m.result.home, m.result.away, m.result.neutral);
            result_difference[by_day[r]] = dr;
            const double points =
                elo_points_exchanged(dr, m.result.home_goals, m.result.away_goals,
                                     settings.k[static_cast<std::size_t>(m.match_class)]);
            change[m.result.home] += points;
            change[m.result.away] -= points;
        }
        for (const auto& [team, points] : change) rating[team] = rating_of(team) + points;
    }

    // Per year of the fixtures: the goals map and the goal-minute histogram before 1 January.
    std::map<int, std::optional<std::pair<EloGoalsMap, std::array<double, scoring::kBuckets>>>>
        by_year;
    for (const auto& fx : fixtures) by_year.emplace(year_of(fx.day), std::nullopt);
    for (auto& [year, entry] : by_year) {
        const int cut = fit::day_number(year, 1, 1);
        const int from = fit::day_number(year - settings.map_years, 1, 1);
        std::vector<double> dr;
        std::vector<int> hg, ag;
        for (std::size_t i = 0; i < results.size(); ++i) {
            const int day = results[i].result.day;
            if (day < from || day >= cut) continue;
            dr.push_back(result_difference[i]);
            hg.push_back(results[i].result.home_goals);
            ag.push_back(results[i].result.away_goals);
        }
        std::array<double, 90> histogram{};
        for (const auto& g : goal_minutes)
            if (g.day < cut && g.minute >= 1 && g.minute <= 90)
                histogram[static_cast<std::size_t>(g.minute - 1)] += 1.0;
        if (dr.size() < 10 || std::accumulate(histogram.begin(), histogram.end(), 0.0) <= 0.0)
            continue;
        const auto map = fit_elo_goals_map(dr, hg, ag);
        out.maps.emplace_back(year, map);
        entry.emplace(map, remaining_share(histogram));
    }
    for (std::size_t i = 0; i < fixtures.size(); ++i) {
        const auto& entry = by_year.at(year_of(fixtures[i].day));
        if (!entry) continue;
        const auto goals = entry->first.expected(out.rating_difference[i]);
        out.means[i] = ReferenceMeans{goals[0], goals[1], entry->second};
    }
    return out;
}

}  // namespace liveprob::backtest
