#include "liveprob/datasets/inplay_records.hpp"

#include <algorithm>
#include <cmath>
#include <optional>

namespace liveprob::datasets {

fit::InplayMatch inplay_match(const MatchTimeline& match, const core::PriorMeans& prior,
                              bool listed_for_goals) {
    fit::InplayMatch out;
    out.prior = prior;
    out.extra_time = match.extra_time;
    out.listed_for_goals = listed_for_goals;
    out.goals.reserve(match.goals.size());
    for (const TimelineGoal& g : match.goals) out.goals.push_back({g.side, g.minute});
    return out;
}

fit::MinuteCounts regulation_minute_counts(std::span<const MatchTimeline> matches,
                                           double half_life_days) {
    fit::MinuteCounts counts{};
    if (matches.empty()) return counts;
    int latest = matches.front().day;
    for (const MatchTimeline& m : matches) latest = std::max(latest, m.day);
    // Each goal weighs 2^(−age / half-life), its age counted from the latest match given.
    double sum = 0.0, sum_squares = 0.0;
    for (const MatchTimeline& m : matches) {
        const double w = half_life_days > 0.0 ? std::exp2(-(latest - m.day) / half_life_days) : 1.0;
        for (const TimelineGoal& g : m.goals)
            if (g.minute >= 1 && g.minute <= 90) {
                counts[static_cast<std::size_t>(g.minute - 1)] += w;
                sum += w;
                sum_squares += w * w;
            }
    }
    // Rescaled to the effective number of goals (Kish: (Σw)² / Σw²), so that the likelihood's
    // curvature, and with it every standard error, counts the information the weights leave.
    if (half_life_days > 0.0 && sum > 0.0)
        for (double& c : counts) c *= sum / sum_squares;
    return counts;
}

StoppageCounts stoppage_counts(std::span<const MatchTimeline> matches) {
    StoppageCounts out;
    for (const MatchTimeline& m : matches)
        for (const TimelineGoal& g : m.goals) {
            if (g.minute < 1 || g.minute > 90) continue;
            ++out.regulation_goals;
            if ((g.minute == 45 || g.minute == 90) && g.stoppage > 0) ++out.stoppage_goals;
        }
    return out;
}

ShootoutRecords shootout_records(std::span<const ShootoutRow> rows) {
    ShootoutRecords out;
    auto side_named = [](const ShootoutRow& r,
                         const std::string& name) -> std::optional<core::Side> {
        if (name == r.home) return core::Side::home;
        if (name == r.away) return core::Side::away;
        return std::nullopt;
    };
    for (const ShootoutRow& r : rows) {
        const auto winner = side_named(r, r.winner);
        if (!winner) {
            ++out.winner_unknown;
            continue;
        }
        out.records.push_back({*winner, side_named(r, r.first_shooter), std::nullopt});
    }
    return out;
}

ShootoutRecords shootout_records(std::span<const MatchTimeline> matches) {
    ShootoutRecords out;
    for (const MatchTimeline& m : matches)
        if (m.shootout && m.shootout->tally)
            out.records.push_back(
                {m.shootout->winner, m.shootout->first_kicker, m.shootout->tally});
    return out;
}

}  // namespace liveprob::datasets
