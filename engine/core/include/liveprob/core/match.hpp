// The engine's public C++ API for one match: create it from a setup, apply inbound messages,
// advance the clock between them, read the outputs. No sockets, files or clocks: the host
// (the service, the replay tool, a graphics system linking the engine) supplies everything.
//
//   liveprob::core::Match match(match_id, setup, params);
//   match.apply(message);              // every inbound message, in any order
//   match.advance_to(clock_now);       // as the host's timer runs between messages
//   const liveprob::core::Outputs& out = match.outputs();
//
// State is a fold over the log of messages, kept in feed order (by source_seq):
//  * a message with a source_seq already in the log is a duplicate and changes nothing;
//  * a message older than the newest in the log is inserted and the log re-folded (late);
//  * a message that is impossible where it stands in the log (a goal before kick-off, a
//    kick outside a shoot-out, ...) is rejected with a reason and never applied; it stays in
//    the log, so that if a late message makes it possible (the kick-off arrives after the
//    goal) the re-fold applies it. Any order of the same messages gives the same state;
//  * a message that is wrong in itself (another match id, unknown side, NaN xG) never enters
//    the log.
// The clock: each applied message anchors the clock to the feed's reading in its header;
// advance_to() moves it on while play runs (not while ClockSync says the clock is stopped,
// nor between periods), so probabilities drift as time passes. Advancing never changes the
// fold: the next message re-anchors the clock to the feed.
// After the final whistle the outputs are the result (probability 1 on what happened). After
// MatchAbandoned the status is `abandoned` and every probability stays as it was priced just
// before: the engine does not guess how an abandoned match is settled, and a screen showing
// the bar does not jump.
#pragma once

#include <array>
#include <cstdint>
#include <memory>
#include <optional>
#include <vector>

#include "liveprob/core/match_state.hpp"
#include "liveprob/core/messages.hpp"
#include "liveprob/core/outputs.hpp"
#include "liveprob/core/params.hpp"
#include "liveprob/core/pricing.hpp"
#include "liveprob/core/reject_reason.hpp"
#include "liveprob/core/state_fold.hpp"

namespace liveprob::core {

enum class Verdict : std::uint8_t {
    accepted = 0,   // newest in the log, applied
    late = 1,       // older than the newest, inserted and applied by a re-fold
    duplicate = 2,  // its source_seq is already in the log; nothing changed
    rejected = 3,   // impossible (see `reason`); not applied
};
[[nodiscard]] const char* verdict_name(Verdict verdict) noexcept;

struct ApplyResult {
    Verdict verdict = Verdict::accepted;
    RejectReason reason = RejectReason::none;  // set when verdict == rejected
    friend bool operator==(const ApplyResult&, const ApplyResult&) = default;
};

// What arrived, counted on arrival (unlike the state, these depend on the arrival order).
struct MatchCounters {
    std::uint64_t accepted = 0;
    std::uint64_t late = 0;
    std::uint64_t duplicates = 0;
    std::uint64_t conflicting_duplicates =
        0;  // same source_seq, different content (also duplicates)
    std::uint64_t rejected = 0;
    std::array<std::uint64_t, kRejectReasonCount> rejected_by_reason{};
};

class ClockInterpolant;  // the engine's internal headers: liveprob/core/clock_interpolant.hpp

class Match {
public:
    // Throws std::invalid_argument when the setup has no usable prior (ratings must be
    // resolved to expected goals first) or the format or parameters are unusable.
    Match(std::uint64_t match_id, const MatchSetup& setup,
          const ModelParams& params = ModelParams{});
    Match(Match&&) noexcept;
    Match& operator=(Match&&) noexcept;
    ~Match();

    [[nodiscard]] ApplyResult apply(const InboundMessage& message);

    // Moves the clock the outputs are priced at. Returns false (and changes nothing) when the
    // clock cannot move there: not in play, clock stopped, another period, or earlier than the
    // feed's last reading. Clocks far beyond the period's end are held at its latest point.
    [[nodiscard]] bool advance_to(MatchClock now);

    // Prices the state at the priced clock into `out` (allocation-free once the thread has
    // priced once). The same state and clock always give the same figures, to the last bit
    // (unless clock interpolation is on, below).
    // A host pricing many matches (the service) passes one buffer of its own, so a match
    // holds no outputs: its memory is its setup, state and event log.
    void price_into(Outputs& out) const;

    // Opt-in: while the match is in play and nothing but the clock moves, price_into() evaluates
    // a polynomial in the clock through exact solves at the nodes of a window that stops at
    // the next kink of the timing profile (every output within 1e-12 of the exact solve; see
    // clock_interpolant.hpp). While a window fills, each call prices exactly and solves one
    // node more, so no call does more than two solves. A clock sync keeps a ready window; any
    // message that changes what the model reads apart from the clock starts a new one. About 29 KB
    // per match while on. Off by default: the exact path is the reference, the same bits on every
    // processor.
    void set_clock_interpolation(bool on);
    [[nodiscard]] bool clock_interpolation() const noexcept { return interpolant_ != nullptr; }

    // A late message re-folds the log from the last checkpoint before its place, not from the
    // start: every `every` log entries the match keeps a copy of the fold state (224 bytes
    // plus 24 per goal and card record; about 1 byte a message at the default). Checkpoints are
    // spaced at least four records' worth of entries apart, so their copies of the records stay
    // under 6 bytes a message even when a feed sends nothing but goals. 0 turns checkpoints
    // off: every late message re-folds the whole log (the reference; the same state to the bit
    // either way, see tests/property/refold_checkpoint_test.cpp).
    static constexpr std::size_t kDefaultRefoldCheckpointInterval = 256;
    void set_refold_checkpoint_interval(std::size_t every);
    [[nodiscard]] std::size_t refold_checkpoint_interval() const noexcept {
        return checkpoint_every_;
    }
    // Heap bytes the checkpoints hold (their slots and goal and card records).
    [[nodiscard]] std::size_t refold_checkpoint_bytes() const noexcept;

    // The same, kept in a buffer the match allocates on first use: priced on demand, so a
    // burst of messages (a re-fold, a replay) prices once. Not thread-safe, like the rest.
    [[nodiscard]] const Outputs& outputs() const;
    const MatchState& state() const noexcept { return state_; }
    const MatchCounters& counters() const noexcept { return counters_; }
    MatchClock priced_clock() const noexcept { return priced_clock_; }
    const MatchSetup& setup() const noexcept { return setup_; }
    std::uint64_t match_id() const noexcept { return fold_.match_id(); }
    const ModelParams& params() const noexcept { return fold_.params(); }
    std::size_t log_size() const noexcept { return log_.size(); }

    // The model's input for the current state at the priced clock (for checks and tools).
    [[nodiscard]] PricingState pricing_state() const { return pricing_state_at(priced_clock_); }

private:
    struct LoggedMessage {
        MessageHeader header;
        EventBody event;
        RejectReason outcome = RejectReason::none;  // none: applied
        InboundMessage message() const { return {header, message_body_of(event)}; }
    };

    // Folds log_[index] onto state_, records its outcome, lays a checkpoint when one is due.
    RejectReason fold_entry(std::size_t index);
    // Re-folds the log after its entries from `changed` on were inserted or changed.
    void refold_from(std::size_t changed);
    // Re-anchors the priced clock to the fold's after a change of the fold; `pricing_moved`
    // false when the change moved nothing the model reads but the clock (a clock sync) and the
    // interpolation window is ready, so that it stays in use.
    void anchor_clock(bool pricing_moved = true) noexcept;
    // What the model reads from the fold state apart from the clock and the exposure so far
    // (which a message folded in order only brings up to its clock under the same state).
    struct PricingInputs {
        MatchStatus status;
        MatchStatus status_before_abandonment;
        Period period;
        bool period_running;
        bool clock_running;
        std::array<int, 2> regulation_goals, extra_time_goals, reds;
        std::array<std::optional<int>, 5> announced_stoppage;
        ShootoutTally shootout;
        std::array<double, 2> xg;
        bool xg_reported;
        friend bool operator==(const PricingInputs&, const PricingInputs&) = default;
    };
    PricingInputs pricing_inputs() const noexcept;
    void count_rejection(RejectReason reason) noexcept;
    // The model's input for the current state with the clock at `clock` (in play: a reading of
    // the current period at or after the anchor).
    PricingState pricing_state_at(MatchClock clock) const;
    void price_exact_at(MatchClock clock, Outputs& out) const;
    void price_drifting(Outputs& out) const;  // price_into with clock interpolation on

    MatchSetup setup_;
    StateFold fold_;
    mutable PricingModel model_;
    std::vector<LoggedMessage> log_;  // sorted by source_seq
    MatchState state_;
    struct Checkpoint {
        std::size_t folded = 0;  // the state after folding log_[0, folded)
        MatchState state;
    };
    // Ascending in `folded`; the first valid_checkpoints_ are current, later slots are kept
    // for their room.
    std::vector<Checkpoint> checkpoints_;
    std::size_t valid_checkpoints_ = 0;
    std::size_t checkpoint_every_ = kDefaultRefoldCheckpointInterval;
    MatchClock priced_clock_;
    MatchCounters counters_;
    mutable std::unique_ptr<Outputs> outputs_;  // outputs()'s buffer, allocated on first use
    mutable bool outputs_stale_ = true;
    // Counts changes of the fold that move pricing other than through the clock: an
    // interpolant's key.
    std::uint64_t fold_epoch_ = 0;
    mutable std::unique_ptr<ClockInterpolant> interpolant_;  // set_clock_interpolation(true)
};

}  // namespace liveprob::core
