#include "liveprob/clients/feed_pacing.hpp"

#include <thread>

namespace liveprob::clients {
namespace {

std::chrono::microseconds scaled(double microseconds, double speed) {
    return std::chrono::microseconds(static_cast<std::int64_t>(microseconds / speed));
}

}  // namespace

std::chrono::steady_clock::time_point FeedPacer::due(const core::InboundMessage& message) {
    const core::MatchClock clock = message.header.clock;
    if (count_++ == 0) {
        start_ = due_ = std::chrono::steady_clock::now();
        first_source_us_ = message.header.source_time_us;
        previous_clock_ = clock;
        return due_;
    }
    switch (mode_) {
        case Mode::asap: break;
        case Mode::rate:
            due_ = start_ + scaled(1e6 * static_cast<double>(count_ - 1), value_);
            break;
        case Mode::match_clock:
            // Within a period only: the breaks between periods are not waited for.
            if (clock.period == previous_clock_.period &&
                clock.clock_ms > previous_clock_.clock_ms) {
                due_ += scaled(1000.0 * (clock.clock_ms - previous_clock_.clock_ms), value_);
            }
            break;
        case Mode::source_time:
            if (message.header.source_time_us > first_source_us_) {
                due_ = std::max(due_,
                                start_ + scaled(static_cast<double>(message.header.source_time_us -
                                                                    first_source_us_),
                                                value_));
            }
            break;
    }
    previous_clock_ = clock;
    return due_;
}

void FeedPacer::wait_for(const core::InboundMessage& message) {
    const auto when = due(message);
    if (when > std::chrono::steady_clock::now()) std::this_thread::sleep_until(when);
}

}  // namespace liveprob::clients
