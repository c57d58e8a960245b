// Where a match stands after folding its event log: the score by phase, red cards, the period
// and clock, the shoot-out, and the evidence about each side's strength. A plain value: two
// folds of the same log compare equal member by member.
#pragma once

#include <array>
#include <cstdint>
#include <optional>
#include <vector>

#include "liveprob/core/messages.hpp"
#include "liveprob/core/outputs.hpp"

namespace liveprob::core {

// A goal the fold counted, kept so that a later cancellation can find it.
struct GoalRecord {
    std::uint64_t seq = 0;
    Side side = Side::home;
    bool extra_time = false;  // scored in extra time (else in regulation)
    bool cancelled = false;
    friend bool operator==(const GoalRecord&, const GoalRecord&) = default;
};

struct CardRecord {
    std::uint64_t seq = 0;
    Side side = Side::home;
    bool rescinded = false;
    friend bool operator==(const CardRecord&, const CardRecord&) = default;
};

struct MatchState {
    MatchStatus status = MatchStatus::not_started;
    // The period in play, or the last one played (during an interval or after the end).
    Period period = Period::pre_match;
    bool period_running = false;
    // Latest feed clock folded in the current period (never moves backwards).
    MatchClock clock;
    bool clock_running = true;  // ClockSync may stop it (the runtime then holds the clock)

    std::array<int, 2> regulation_goals{};
    std::array<int, 2> extra_time_goals{};
    std::array<int, 2> reds{};  // shown and not rescinded
    // Announced stoppage, minutes, indexed by Period (first_half .. extra_second).
    std::array<std::optional<int>, 5> announced_stoppage{};
    ShootoutTally shootout;

    // Strength evidence: expected goals of each side over the play elapsed up to `clock`,
    // under the prior and the states actually passed through (lambda * integral of r * m),
    // and the summed xG of its shots.
    std::array<double, 2> exposure{};
    std::array<double, 2> xg{};
    bool xg_reported = false;  // the feed has sent xG (from then on it counts as evidence)

    std::vector<GoalRecord> goals_log;
    std::vector<CardRecord> cards_log;

    // Status when MatchAbandoned arrived: the outputs stay priced as of that state.
    MatchStatus status_before_abandonment = MatchStatus::not_started;

    std::uint64_t applied = 0;  // messages of the log that were applied
    std::uint64_t skipped = 0;  // messages of the log that were impossible where they stand

    friend bool operator==(const MatchState&, const MatchState&) = default;

    [[nodiscard]] int goals(Side s) const noexcept {
        return regulation_goals[static_cast<std::size_t>(index(s))] +
               extra_time_goals[static_cast<std::size_t>(index(s))];
    }
    bool finished() const noexcept { return status == MatchStatus::finished; }
};

// The clock at which `period` starts, in milliseconds of the running match clock.
std::uint32_t period_start_ms(const CompetitionFormat& format, Period period) noexcept;
// The clock at which `period` nominally ends (before stoppage).
std::uint32_t period_nominal_end_ms(const CompetitionFormat& format, Period period) noexcept;
// Latest clock a message may carry in `period`: the nominal end plus a generous stoppage
// allowance (common practice: no half runs 30 minutes over).
std::uint32_t period_latest_ms(const CompetitionFormat& format, Period period) noexcept;
inline constexpr std::uint32_t kStoppageAllowanceMs = 30U * 60U * 1000U;

// Orders clocks as the match runs: by period, then by clock reading.
[[nodiscard]] bool clock_before(const MatchClock& a, const MatchClock& b) noexcept;

bool is_playing_period(Period p) noexcept;  // first_half .. extra_second
[[nodiscard]] bool is_extra_time(Period p) noexcept;

// Shoot-out arithmetic (best of five, then sudden death in pairs).
[[nodiscard]] bool shootout_decided(const ShootoutTally& tally) noexcept;
[[nodiscard]] Side shootout_next_kicker(const ShootoutTally& tally) noexcept;

// The period a format plays after `last`, or `finished` when nothing follows.
[[nodiscard]] Period next_period(const CompetitionFormat& format, Period last) noexcept;

// After a period has ended (or during the shoot-out): whether the match may end here, i.e.
// regulation is played and a tie that needs a winner has one, or no way left to find one.
[[nodiscard]] bool may_end_after(const MatchState& state, const CompetitionFormat& format) noexcept;

// Aggregate goal difference for the home side of this match: this match's goals plus the
// first leg, if any.
[[nodiscard]] int aggregate_difference(const MatchState& state,
                                       const CompetitionFormat& format) noexcept;

}  // namespace liveprob::core
