// When to send each message of a feed that is being replayed: as fast as possible, at a fixed
// rate, by the match clock (one match; breaks between periods skipped), or by the feed's own
// timestamps (many matches interleaved as they were recorded) at a speed factor. Used by `send`
// and by the live replay.
#pragma once

#include <chrono>
#include <cstdint>
#include <optional>

#include "liveprob/core/messages.hpp"

namespace liveprob::clients {

class FeedPacer {
public:
    static FeedPacer as_fast_as_possible() { return FeedPacer(Mode::asap, 0.0); }
    static FeedPacer at_rate(double messages_per_second) {
        return FeedPacer(Mode::rate, messages_per_second);
    }
    // `speed` times real time, by the match clock between consecutive messages.
    static FeedPacer by_match_clock(double speed) { return FeedPacer(Mode::match_clock, speed); }
    // `speed` times real time, by the messages' source timestamps.
    static FeedPacer by_source_time(double speed) { return FeedPacer(Mode::source_time, speed); }

    // When `message`, the next of the feed, is due (the first is due at once).
    std::chrono::steady_clock::time_point due(const core::InboundMessage& message);
    // Sleeps until then.
    void wait_for(const core::InboundMessage& message);

private:
    enum class Mode : std::uint8_t { asap, rate, match_clock, source_time };
    FeedPacer(Mode mode, double value) : mode_(mode), value_(value) {}

    Mode mode_;
    double value_;
    std::uint64_t count_ = 0;
    std::chrono::steady_clock::time_point start_{}, due_{};
    core::MatchClock previous_clock_;
    std::int64_t first_source_us_ = 0;
};

}  // namespace liveprob::clients
