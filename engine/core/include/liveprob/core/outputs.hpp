// Everything the engine publishes on an update. Fixed-size storage so that computing an
// update allocates nothing.
#pragma once

#include <array>
#include <cstdint>

#include "liveprob/core/messages.hpp"

namespace liveprob::core {

// Largest number of goals per side still to come that the score grid holds; mass beyond it
// is reported as `tail_mass`.
inline constexpr int kMaxGoalsAdded = 15;
inline constexpr int kGrid = kMaxGoalsAdded + 1;

// Totals lines 0.5, 1.5, ... 5.5 on the match's final total goals.
inline constexpr int kTotalsLines = 6;

enum class MatchStatus : std::uint8_t {
    not_started = 0,
    in_play = 1,
    interval = 2,  // between periods (half-time, before extra time, before the shoot-out)
    shootout = 3,
    finished = 4,
    abandoned = 5,
};

// The penalty shoot-out so far. Kicks alternate (a kick out of turn is refused), so the side of
// the first kick and each side's scored bits give the whole sequence for a screen to draw.
inline constexpr int kShootoutKicksRecorded = 64;  // per side; more are counted, not recorded
struct ShootoutTally {
    std::array<int, 2> taken{};
    std::array<int, 2> scored{};
    Side first = Side::home;  // side of the first kick (meaningful once a kick is taken)
    // Bit k set: the side's kick k + 1 was scored (the first kShootoutKicksRecorded kicks).
    std::array<std::uint64_t, 2> scored_bits{};
    friend bool operator==(const ShootoutTally&, const ShootoutTally&) = default;
};

struct Outputs {
    // Where the match stands.
    MatchStatus status = MatchStatus::not_started;
    MatchClock clock;
    std::uint16_t home_goals = 0;
    std::uint16_t away_goals = 0;
    std::uint8_t home_reds = 0;
    std::uint8_t away_reds = 0;

    // Result at the end of regulation (full time).
    double p_home = 0.0;
    double p_draw = 0.0;
    double p_away = 0.0;

    // To advance (knock-out formats only; both 0 when `has_advance` is false).
    bool has_advance = false;
    double p_advance_home = 0.0;
    double p_advance_away = 0.0;

    // Expected goals at full time (current score plus expected goals to come).
    double expected_home_goals = 0.0;
    double expected_away_goals = 0.0;

    // Who scores the next goal before the end of regulation.
    double next_goal_home = 0.0;
    double next_goal_away = 0.0;
    double next_goal_none = 0.0;

    // P(total goals at full time > line) for lines 0.5 ... 5.5.
    std::array<double, kTotalsLines> p_over{};
    double p_both_score = 0.0;

    // Full-time score distribution: cell [i][j] = P(home adds i goals, away adds j goals)
    // from now to full time, so the final score is (home_goals + i, away_goals + j).
    std::array<std::array<double, kGrid>, kGrid> goals_added{};
    double tail_mass = 0.0;  // probability of more than kMaxGoalsAdded more goals for a side

    // Number of accepted inbound messages folded into this state.
    std::uint64_t events_applied = 0;

    // The shoot-out's kicks (all zero before one starts).
    ShootoutTally shootout;
};

inline double totals_line(int i) noexcept { return 0.5 + i; }

// Stable snake_case name of a status ("in_play"), used by tap, the gateway and logs.
[[nodiscard]] const char* status_name(MatchStatus status) noexcept;

}  // namespace liveprob::core
