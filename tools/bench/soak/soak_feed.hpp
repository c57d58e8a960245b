// The soak's feed: a fixed number of concurrent matches ("slots"), each playing a whole match
// of `events_per_match` messages, the next match taking the slot when one ends. Messages go out
// round-robin over the slots, so event i of the run is a pure function of i: the sender and
// the subscriber agree on which (match id, sequence number) is event i without sharing state.
#pragma once

#include <cstdint>

#include "liveprob/core/messages.hpp"

namespace liveprob::soak {

class SoakFeed {
public:
    // `events_per_match` >= 8: setup, kick-off, both halves' ends, the second half's start and
    // the final whistle, and at least two in-play messages.
    SoakFeed(std::uint64_t slots, std::uint64_t events_per_match, std::uint64_t first_match_id = 1);

    core::InboundMessage event(std::uint64_t index) const;
    // The index of the event with this match id and sequence number; nullopt-like ~0 when the
    // pair is not one of this feed's.
    std::uint64_t index_of(std::uint64_t match_id, std::uint64_t source_seq) const noexcept;
    static constexpr std::uint64_t kNotOurs = ~std::uint64_t{0};

    std::uint64_t slots() const noexcept { return slots_; }
    std::uint64_t events_per_match() const noexcept { return events_per_match_; }

private:
    core::InboundMessage in_play(std::uint64_t match_id, std::uint64_t j, core::Period period,
                                 std::uint32_t clock_ms) const;

    std::uint64_t slots_;
    std::uint64_t events_per_match_;
    std::uint64_t first_match_id_;
    std::uint64_t half_end_;  // position of the first half's end in a match's messages
};

}  // namespace liveprob::soak
