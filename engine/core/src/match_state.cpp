#include "liveprob/core/match_state.hpp"

namespace liveprob::core {

namespace {
constexpr std::uint32_t minutes_ms(std::uint32_t minutes) noexcept { return minutes * 60U * 1000U; }
}  // namespace

std::uint32_t period_start_ms(const CompetitionFormat& format, Period period) noexcept {
    const std::uint32_t half = minutes_ms(format.half_minutes);
    const std::uint32_t extra = minutes_ms(format.extra_half_minutes);
    switch (period) {
        case Period::pre_match:
        case Period::first_half: return 0;
        case Period::second_half: return half;
        case Period::extra_first: return 2 * half;
        case Period::extra_second: return 2 * half + extra;
        case Period::shootout:
        case Period::finished: return 2 * half + 2 * extra;
    }
    return 0;
}

std::uint32_t period_nominal_end_ms(const CompetitionFormat& format, Period period) noexcept {
    const std::uint32_t half = minutes_ms(format.half_minutes);
    const std::uint32_t extra = minutes_ms(format.extra_half_minutes);
    switch (period) {
        case Period::first_half:
        case Period::second_half: return period_start_ms(format, period) + half;
        case Period::extra_first:
        case Period::extra_second: return period_start_ms(format, period) + extra;
        case Period::pre_match:
        case Period::shootout:
        case Period::finished: return period_start_ms(format, period);
    }
    return 0;
}

std::uint32_t period_latest_ms(const CompetitionFormat& format, Period period) noexcept {
    return period_nominal_end_ms(format, period) + kStoppageAllowanceMs;
}

bool clock_before(const MatchClock& a, const MatchClock& b) noexcept {
    if (a.period != b.period) return a.period < b.period;
    return a.clock_ms < b.clock_ms;
}

bool is_playing_period(Period p) noexcept {
    return p >= Period::first_half && p <= Period::extra_second;
}
bool is_extra_time(Period p) noexcept {
    return p == Period::extra_first || p == Period::extra_second;
}

bool shootout_decided(const ShootoutTally& t) noexcept {
    const int home_taken = t.taken[0], away_taken = t.taken[1];
    const int home_scored = t.scored[0], away_scored = t.scored[1];
    if (home_taken <= 5 && away_taken <= 5) {
        // Best of five: decided once one side cannot catch up with the kicks it has left.
        const int home_left = 5 - home_taken, away_left = 5 - away_taken;
        if (home_scored + home_left < away_scored) return true;
        if (away_scored + away_left < home_scored) return true;
        if (home_taken < 5 || away_taken < 5) return false;
        return home_scored != away_scored;
    }
    // Sudden death: decided after a completed pair that separates the sides.
    return home_taken == away_taken && home_scored != away_scored;
}

Side shootout_next_kicker(const ShootoutTally& t) noexcept {
    const Side second = other(t.first);
    const int first_taken = t.taken[static_cast<std::size_t>(index(t.first))];
    const int second_taken = t.taken[static_cast<std::size_t>(index(second))];
    return first_taken == second_taken ? t.first : second;
}

int aggregate_difference(const MatchState& state, const CompetitionFormat& format) noexcept {
    int diff = state.goals(Side::home) - state.goals(Side::away);
    if (format.first_leg) diff += format.first_leg->home_goals - format.first_leg->away_goals;
    return diff;
}

Period next_period(const CompetitionFormat& format, Period last) noexcept {
    switch (last) {
        case Period::pre_match: return Period::first_half;
        case Period::first_half: return Period::second_half;
        case Period::second_half:
            if (format.extra_time) return Period::extra_first;
            return format.shootout ? Period::shootout : Period::finished;
        case Period::extra_first: return Period::extra_second;
        case Period::extra_second: return format.shootout ? Period::shootout : Period::finished;
        case Period::shootout:
        case Period::finished: return Period::finished;
    }
    return Period::finished;
}

bool may_end_after(const MatchState& state, const CompetitionFormat& format) noexcept {
    if (state.period < Period::second_half) return false;
    if (state.period == Period::shootout) return shootout_decided(state.shootout);
    if (state.period == Period::extra_first) return false;  // extra time is played in full
    if (aggregate_difference(state, format) != 0) return true;
    return next_period(format, state.period) == Period::finished;
}

}  // namespace liveprob::core
