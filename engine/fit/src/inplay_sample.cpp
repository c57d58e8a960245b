#include "liveprob/fit/inplay_sample.hpp"

#include <algorithm>
#include <cstdint>

#include "liveprob/core/timing.hpp"

namespace liveprob::fit {
namespace {

constexpr double kMsPerMinute = 60'000.0;

core::CompetitionFormat with_extra_time() {
    core::CompetitionFormat f;
    f.extra_time = true;
    return f;
}

double exposure_to(const core::TimingCurve& curve, core::Period period, double clock_minutes) {
    const auto ms = static_cast<std::uint32_t>(std::max(0.0, clock_minutes) * kMsPerMinute);
    return curve.exposure({core::Period::first_half, 0}, {period, ms});
}

// The minute bucket a source minute falls in, as an interval of cumulative exposure.
struct Bucket {
    int key = 0;  // equal for goals of the same bucket
    double from = 0.0, to = 0.0;
};

Bucket bucket_of(int minute, const core::TimingCurve& curve) {
    minute = std::max(minute, 1);
    const core::Period period = minute <= 45    ? core::Period::first_half
                                : minute <= 90  ? core::Period::second_half
                                : minute <= 105 ? core::Period::extra_first
                                                : core::Period::extra_second;
    const int end = static_cast<int>(curve.period_end_minutes(period));
    if (minute < end)
        return {minute, exposure_to(curve, period, minute - 1.0),
                exposure_to(curve, period, minute)};
    const double stoppage = curve.expected_stoppage_minutes(period);
    return {end, exposure_to(curve, period, end - 1.0), exposure_to(curve, period, end + stoppage)};
}

std::vector<double> positions(const std::vector<InplayGoal>& goals,
                              const core::TimingCurve& curve) {
    std::vector<double> out(goals.size());
    for (std::size_t i = 0; i < goals.size();) {
        const Bucket b = bucket_of(goals[i].minute, curve);
        std::size_t j = i;
        while (j < goals.size() && bucket_of(goals[j].minute, curve).key == b.key) ++j;
        const double k = static_cast<double>(j - i);
        for (std::size_t g = i; g < j; ++g)
            out[g] = b.from + (static_cast<double>(g - i) + 0.5) / k * (b.to - b.from);
        i = j;
    }
    return out;
}

ScoreState state_of(int own, int other) {
    return own > other   ? ScoreState::leading
           : own < other ? ScoreState::trailing
                         : ScoreState::level;
}

RegulationRecord regulation_from(const InplayMatch& match, const std::vector<double>& at) {
    RegulationRecord r;
    r.listed_for_goals = match.listed_for_goals;
    r.sides[0].prior = match.prior.home_goals;
    r.sides[1].prior = match.prior.away_goals;
    std::array<int, 2> score{0, 0};
    double last = 0.0;
    auto spend = [&](double until) {
        const double span = std::max(0.0, until - last);
        r.sides[0].exposure[static_cast<std::size_t>(state_of(score[0], score[1]))] += span;
        r.sides[1].exposure[static_cast<std::size_t>(state_of(score[1], score[0]))] += span;
        last = std::max(last, until);
    };
    for (std::size_t i = 0; i < match.goals.size(); ++i) {
        const InplayGoal& g = match.goals[i];
        if (g.minute > 90) continue;
        spend(at[i]);
        const auto s = static_cast<std::size_t>(index(g.side));
        ++r.sides[s].goals[static_cast<std::size_t>(state_of(score[s], score[1 - s]))];
        ++score[s];
    }
    spend(1.0);  // the whole of regulation, expected stoppage included, is exposure 1
    return r;
}

}  // namespace

std::vector<double> goal_exposures(const std::vector<InplayGoal>& goals,
                                   const core::TimingProfile& timing) {
    return positions(goals, core::TimingCurve(timing, with_extra_time()));
}

RegulationRecord regulation_record(const InplayMatch& match, const core::TimingProfile& timing) {
    return regulation_from(match, goal_exposures(match.goals, timing));
}

ExtraTimeRecord extra_time_record(const InplayMatch& match, const core::TimingProfile& timing) {
    core::TimingProfile unit = timing;
    unit.extra_time_factor = 1.0;
    const core::TimingCurve curve(unit, with_extra_time());
    const std::vector<double> at = positions(match.goals, curve);
    ExtraTimeRecord r;
    r.regulation = regulation_from(match, at);
    const double start = 1.0;
    const double end =
        exposure_to(curve, core::Period::extra_second,
                    120.0 + curve.expected_stoppage_minutes(core::Period::extra_second));
    r.extra_time_exposure = end - start;
    r.exposure_to_first_goal = end - start;
    for (std::size_t i = 0; i < match.goals.size(); ++i) {
        if (match.goals[i].minute <= 90) continue;
        r.exposure_to_first_goal = std::clamp(at[i] - start, 0.0, end - start);
        r.first_scorer = match.goals[i].side;
        break;
    }
    return r;
}

}  // namespace liveprob::fit
