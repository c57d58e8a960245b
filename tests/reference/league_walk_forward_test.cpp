// Pre-match forecast quality, walk-forward on the four leagues of the open data: each season
// is predicted from the seasons before it plus the season so far (refitted weekly, never a
// match on or after the forecast's date). RPS, Brier and log loss of the ratings beside two
// baselines from the same run: the league's base rates and equal teams with home advantage.
// The ratings must beat both baselines (on RPS) in every season.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <filesystem>
#include <iostream>
#include <map>

#include "liveprob/datasets/results_readers.hpp"
#include "liveprob/fit/dixon_coles.hpp"
#include "liveprob/scoring/scoring_rules.hpp"
#include "test_env.hpp"

namespace fit = liveprob::fit;
namespace scoring = liveprob::scoring;

namespace {

struct Scores {
    double rps = 0, brier = 0, log_loss = 0;
    int n = 0;
    void add(const scoring::Forecast& f, scoring::Outcome o) {
        rps += scoring::ranked_probability_score(f, o);
        brier += scoring::brier_score(f, o);
        log_loss += scoring::log_loss(f, o);
        ++n;
    }
    double mean_rps() const { return rps / n; }
};

struct SeasonResult {
    std::string league, season;
    Scores ratings, base_rates, equal_teams;
};

constexpr int kRefitDays = 7;

SeasonResult predict_season(const std::string& league, const std::string& season,
                            const std::vector<fit::MatchResult>& history,
                            std::vector<fit::MatchResult> games) {
    SeasonResult out{league, season, {}, {}, {}};
    std::sort(games.begin(), games.end(),
              [](const auto& a, const auto& b) { return a.day < b.day; });
    std::vector<fit::MatchResult> known = history;
    fit::RatingsFitOptions options;
    options.xi = std::log(2.0) / 240.0;  // half-life 240 days: the project's choice
    options.fit_rho = true;
    options.min_matches = 6.0;
    options.min_weight = 0.01;
    options.standard_errors = false;
    std::optional<fit::Ratings> ratings;
    int fitted_day = -1;
    for (const auto& g : games) {
        if (fitted_day < 0 || g.day >= fitted_day + kRefitDays) {
            // The as-of cut keeps today's and later matches out of the fit.
            options.as_of_day = g.day;
            options.start = ratings ? &*ratings : nullptr;
            fit::Ratings next = fit::fit_ratings(known, options);
            ratings = std::move(next);
            fitted_day = g.day;
        }
        const scoring::Outcome outcome = scoring::outcome_of(g.home_goals, g.away_goals);
        // Base rates of the training window (matches before today).
        std::array<double, 3> counts{0, 0, 0};
        for (const auto& k : known)
            if (k.day < g.day)
                counts[static_cast<std::size_t>(scoring::outcome_of(k.home_goals, k.away_goals))] +=
                    1;
        const double total = counts[0] + counts[1] + counts[2];
        out.base_rates.add({counts[0] / total, counts[1] / total, counts[2] / total}, outcome);

        const fit::TeamRating average{};
        const fit::TeamRating* home = ratings->find(g.home);
        const fit::TeamRating* away = ratings->find(g.away);
        const auto e =
            fit::expected_goals(*ratings, home ? *home : average, away ? *away : average, false);
        const auto p = fit::outcome_probabilities(e.home, e.away, ratings->rho);
        out.ratings.add({p.home, p.draw, p.away}, outcome);
        const auto q = fit::expected_goals(*ratings, average, average, false);
        const auto pe = fit::outcome_probabilities(q.home, q.away, ratings->rho);
        out.equal_teams.add({pe.home, pe.draw, pe.away}, outcome);
        known.push_back(g);  // known from the next refit on (the refit's as-of excludes today)
    }
    return out;
}

}  // namespace

TEST_CASE("ratings beat the league base rates and equal teams in every season, walk-forward") {
    const auto root = liveprob::test::open_data_dir() / "leagues";
    std::map<std::string, std::vector<std::pair<std::string, std::vector<fit::MatchResult>>>>
        leagues;
    std::vector<std::string> seasons;
    for (const auto& entry : std::filesystem::directory_iterator(root))
        if (entry.is_directory()) seasons.push_back(entry.path().filename().string());
    std::sort(seasons.begin(), seasons.end());
    for (const auto& season : seasons)
        for (const char* code : {"de", "es", "fr", "it"}) {
            const auto file = root / season / fmt::format("{}.1.json", code);
            if (!std::filesystem::exists(file)) continue;
            auto read = liveprob::datasets::read_league_json(file.string());
            leagues[code].emplace_back(season, std::move(read.matches));
        }
    REQUIRE(leagues.size() == 4);

    std::vector<SeasonResult> results;
    for (const auto& [league, list] : leagues) {
        std::vector<fit::MatchResult> history =
            list.front().second;  // the first season only trains
        for (std::size_t s = 1; s < list.size(); ++s) {
            if (list[s].second.size() < 40) continue;  // a season barely begun
            results.push_back(predict_season(league, list[s].first, history, list[s].second));
            history.insert(history.end(), list[s].second.begin(), list[s].second.end());
        }
    }
    std::cout << fmt::format("{:<6} {:<8} {:>5}  {:>23}  {:>23}  {:>23}\n", "league", "season", "n",
                             "ratings RPS/Brier/LL", "base rates RPS/Brier/LL",
                             "equal teams RPS/Brier/LL");
    auto cell = [](const Scores& s) {
        return fmt::format("{:.4f} {:.4f} {:.4f}", s.rps / s.n, s.brier / s.n, s.log_loss / s.n);
    };
    for (const auto& r : results)
        std::cout << fmt::format("{:<6} {:<8} {:>5}  {:>23}  {:>23}  {:>23}\n", r.league, r.season,
                                 r.ratings.n, cell(r.ratings), cell(r.base_rates),
                                 cell(r.equal_teams));
    CHECK(results.size() >= 40);
    for (const auto& r : results) {
        INFO(r.league << " " << r.season);
        CHECK(r.ratings.mean_rps() < r.base_rates.mean_rps());
        CHECK(r.ratings.mean_rps() < r.equal_teams.mean_rps());
    }
}

TEST_CASE("league sanity band: home wins clearly outnumber away wins") {
    // A fact of the trade (common practice): the home side wins clearly more often.
    const auto root = liveprob::test::open_data_dir() / "leagues";
    int home_wins = 0, away_wins = 0, matches = 0;
    for (const auto& season : std::filesystem::directory_iterator(root))
        for (const char* code : {"de", "es", "fr", "it"}) {
            const auto file = season.path() / fmt::format("{}.1.json", code);
            if (!std::filesystem::exists(file)) continue;
            for (const auto& m : liveprob::datasets::read_league_json(file.string()).matches) {
                home_wins += m.home_goals > m.away_goals;
                away_wins += m.home_goals < m.away_goals;
                ++matches;
            }
        }
    REQUIRE(matches > 15000);
    CHECK(home_wins > 1.2 * away_wins);
}
