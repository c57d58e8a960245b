// Why the match state refused a message. The names are stable: counters, logs and the C ABI
// report them, so a value is never renumbered or renamed once released (append only).
#pragma once

#include <cstdint>

namespace liveprob::core {

enum class RejectReason : std::uint8_t {
    none = 0,
    // Found by looking at the message alone: such a message never enters the log.
    other_match = 1,           // header names another match id
    unknown_side = 2,          // side is neither home nor away
    unknown_period = 3,        // period value out of range, or not a period of play
    bad_xg = 4,                // xG negative, NaN, infinite or above 1 for one shot
    implausible_stoppage = 5,  // more announced stoppage than any half could have
    implausible_score = 6,     // score correction beyond what the score grid can hold
    setup_in_stream = 7,       // a setup after the match was created from one
    // Found by folding the message onto the state before it (it stays in the log, skipped,
    // and is applied if a late message later makes it possible).
    before_kickoff = 8,         // an in-play event before the first half started
    after_final_whistle = 9,    // anything after the final whistle
    after_abandonment = 10,     // anything after the match was abandoned
    period_not_started = 11,    // clock or event names a period that has not started
    period_already_over = 12,   // clock names a period that has already ended
    period_not_running = 13,    // in-play event during an interval
    period_out_of_order = 14,   // a period start/end that does not follow the format
    clock_outside_period = 15,  // clock before the period's start or far beyond its end
    unknown_goal = 16,          // cancelling a goal the log does not hold
    goal_already_cancelled = 17,
    unknown_card = 18,  // rescinding a card the log does not hold
    card_already_rescinded = 19,
    score_below_zero = 20,  // a cancellation or correction would leave fewer than 0
    kick_outside_shootout = 21,
    kick_out_of_turn = 22,  // shoot-out kicks alternate, the first kicker's side first
    shootout_already_decided = 23,
    goal_in_shootout = 24,         // shoot-out kicks are ShootoutKick messages, not goals
    final_whistle_too_early = 25,  // regulation (or the tie's decider) not yet played out
};

inline constexpr int kRejectReasonCount = 26;

// Stable snake_case name ("before_kickoff"); "unknown" for a value outside the enum.
[[nodiscard]] const char* reject_reason_name(RejectReason reason) noexcept;

}  // namespace liveprob::core
