#include "liveprob/backtest/comparison.hpp"

#include <fmt/format.h>

#include <map>

#include "liveprob/fit/calendar.hpp"

namespace liveprob::backtest {

namespace {

constexpr std::int64_t kDayUs = 86'400'000'000LL;

int day_of(std::int64_t us) {
    return static_cast<int>(us >= 0 ? us / kDayUs : (us - kDayUs + 1) / kDayUs);
}

using Rows = std::vector<const ScoredRow*>;

BucketEvaluation evaluate_bucket(const Rows& rows, std::size_t columns, int bucket,
                                 const EvaluationSettings& settings, bool calibrated) {
    BucketEvaluation out;
    out.columns.resize(columns);
    out.model_against.resize(columns);
    const auto b = static_cast<std::size_t>(bucket);
    for (std::size_t c = 0; c < columns; ++c) {
        scoring::ScoreAccumulator acc;
        std::vector<scoring::Forecast> forecasts;
        std::vector<double> model_rps, other_rps;
        for (const ScoredRow* row : rows) {
            const auto& f = row->forecasts[b][c];
            if (!f) continue;
            acc.add(*f, row->result);
            if (calibrated) forecasts.push_back(*f);
            const auto& model = row->forecasts[b][0];
            if (c > 0 && model) {
                model_rps.push_back(scoring::ranked_probability_score(*model, row->result));
                other_rps.push_back(scoring::ranked_probability_score(*f, row->result));
            }
        }
        auto& s = out.columns[c];
        s.n = acc.count();
        s.rps = acc.mean_rps();
        s.brier = acc.mean_brier();
        s.log_loss = acc.mean_log_loss();
        s.ece = acc.calibration().expected_calibration_error();
        s.calibration = acc.calibration();
        if (calibrated) {
            // Each bucket and column its own stream of draws, all from the one reported seed.
            s.calibrated = scoring::calibrated_forecaster_ece(
                forecasts, settings.calibration_draws,
                settings.bootstrap.seed + 1000 * (c + 1) + static_cast<std::uint64_t>(bucket));
        }
        if (c > 0)
            out.model_against[c] =
                scoring::paired_bootstrap(model_rps, other_rps, settings.bootstrap);
    }
    return out;
}

GroupEvaluation evaluate_group(std::string name, const Rows& rows, std::size_t columns,
                               const EvaluationSettings& settings) {
    GroupEvaluation g;
    g.group = std::move(name);
    g.matches = rows.size();
    g.too_small = rows.size() < settings.min_group;
    for (int b = 0; b < scoring::kBuckets; ++b)
        g.buckets[static_cast<std::size_t>(b)] = evaluate_bucket(rows, columns, b, settings, false);
    return g;
}

}  // namespace

ScoredTable scored_table(const std::vector<MatchReplay>& primary,
                         const std::vector<ConfigurationRun>& configurations,
                         const std::unordered_map<std::uint64_t, MatchFacts>& facts) {
    ScoredTable table;
    for (int f = 0; f < kForecasters; ++f)
        table.columns.emplace_back(forecaster_name(static_cast<Forecaster>(f)));
    std::vector<std::unordered_map<std::uint64_t, const MatchReplay*>> others;
    for (const auto& c : configurations) {
        table.columns.push_back(c.name);
        auto& index = others.emplace_back();
        for (const auto& r : *c.replays)
            if (r.fate == ReplayFate::scored) index.emplace(r.match_id, &r);
    }
    for (const auto& r : primary) {
        if (r.fate != ReplayFate::scored) continue;
        ScoredRow row;
        row.match_id = r.match_id;
        row.day = day_of(r.scheduled_kickoff_us);
        if (const auto it = facts.find(r.match_id); it != facts.end())
            row.competition = it->second.competition;
        row.home = r.home_name;
        row.away = r.away_name;
        row.regulation_goals = r.regulation_goals;
        row.result = r.result;
        for (int b = 0; b < scoring::kBuckets; ++b) {
            auto& slot = row.forecasts[static_cast<std::size_t>(b)];
            const auto& own = r.forecasts[static_cast<std::size_t>(b)];
            slot.assign(own.begin(), own.end());
            for (const auto& index : others) {
                const auto it = index.find(r.match_id);
                // Paired only when the configuration saw the same result.
                slot.push_back(it != index.end() && it->second->result == r.result
                                   ? it->second->forecasts[static_cast<std::size_t>(b)][0]
                                   : std::nullopt);
            }
        }
        table.rows.push_back(std::move(row));
    }
    return table;
}

Evaluation evaluate(const ScoredTable& table, const EvaluationSettings& settings) {
    Evaluation out;
    out.settings = settings;
    out.columns = table.columns;
    out.matches = table.rows.size();
    const std::size_t columns = table.columns.size();
    Rows all;
    for (const auto& row : table.rows) all.push_back(&row);
    for (int b = 0; b < scoring::kBuckets; ++b)
        out.buckets[static_cast<std::size_t>(b)] = evaluate_bucket(all, columns, b, settings, true);

    std::map<std::string, Rows> by_competition, by_year;
    for (const auto* row : all) {
        by_competition[row->competition.empty() ? "(unknown)" : row->competition].push_back(row);
        by_year[fit::iso_date(row->day).substr(0, 4)].push_back(row);
    }
    Rows other;
    for (const auto& [name, rows] : by_competition) {
        if (rows.size() < settings.min_group) {
            other.insert(other.end(), rows.begin(), rows.end());
            continue;
        }
        out.by_competition.push_back(evaluate_group(name, rows, columns, settings));
    }
    if (!other.empty())
        out.by_competition.push_back(evaluate_group(
            fmt::format("other competitions (each under {} matches)", settings.min_group), other,
            columns, settings));
    for (const auto& [year, rows] : by_year)
        out.by_year.push_back(evaluate_group(year, rows, columns, settings));

    // Where the interval of a difference holds 0, this n cannot tell the two apart.
    for (std::size_t c = 1; c < columns; ++c) {
        std::string buckets;
        std::uint64_t n = 0;
        for (int b = 0; b < scoring::kBuckets; ++b) {
            const auto& d = out.buckets[static_cast<std::size_t>(b)].model_against[c];
            // Identical forecasts (the model is the fixed prior at kick-off) are no comparison.
            if (d.n == 0 || d.separated() || (d.difference_low == 0 && d.difference_high == 0))
                continue;
            buckets += fmt::format("{}{}", buckets.empty() ? "" : ", ", scoring::bucket_label(b));
            n = std::max(n, d.n);
        }
        if (!buckets.empty())
            out.warnings.push_back(fmt::format(
                "model against {}: at n = {} the {:.0f}% interval of the RPS difference holds 0 "
                "at {} (too few matches to tell them apart there)",
                table.columns[c], n, 100 * settings.bootstrap.level, buckets));
    }
    return out;
}

}  // namespace liveprob::backtest
