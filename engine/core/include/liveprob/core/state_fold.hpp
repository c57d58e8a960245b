// One step of the match-state fold: checks an inbound message against the state before it
// and, when it is possible there, applies it. Knows the match's setup and the model only to
// accumulate the strength evidence (expected goals over the play actually passed through).
#pragma once

#include <array>
#include <cstdint>

#include "liveprob/core/match_state.hpp"
#include "liveprob/core/messages.hpp"
#include "liveprob/core/params.hpp"
#include "liveprob/core/reject_reason.hpp"
#include "liveprob/core/timing.hpp"

namespace liveprob::core {

class StateFold {
public:
    StateFold(std::uint64_t match_id, const CompetitionFormat& format, const PriorMeans& prior,
              const ModelParams& params);

    // The state before any event, with room reserved for a match's goals and cards.
    [[nodiscard]] MatchState initial_state() const;

    // Checks that need nothing but the message (a message failing them never enters the log).
    [[nodiscard]] RejectReason screen(const InboundMessage& message) const noexcept;

    // Folds `message` onto `state`. Returns none and applies it, or returns why it is
    // impossible there and leaves `state` exactly as it was. Allocation-free unless a goal or
    // card record outgrows the reserved room.
    [[nodiscard]] RejectReason apply(MatchState& state, const InboundMessage& message) const;

    // Expected goals of each side between the state's clock and `to_ms` (same period) under
    // the state as it stands: the exposure the clock adds while nothing happens.
    std::array<double, 2> exposure_until(const MatchState& state, std::uint32_t to_ms) const;

    const CompetitionFormat& format() const noexcept { return format_; }
    const PriorMeans& prior() const noexcept { return prior_; }
    const ModelParams& params() const noexcept { return params_; }
    const TimingCurve& curve() const noexcept { return curve_; }
    std::uint64_t match_id() const noexcept { return match_id_; }

private:
    struct Step;  // the per-kind handlers (state_fold.cpp)

    std::uint64_t match_id_;
    CompetitionFormat format_;
    PriorMeans prior_;
    ModelParams params_;
    TimingCurve curve_;
};

}  // namespace liveprob::core
