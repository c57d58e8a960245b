#include "soak_feed.hpp"

#include <stdexcept>

#include "liveprob/protocol/sharding.hpp"

namespace liveprob::soak {

namespace {

constexpr std::uint32_t kHalfMs = 45 * 60'000;
constexpr std::int64_t kSourceEpochUs = 1'800'000'000'000'000;

// A well-mixed number from a match id and a position (the sharding hash serves well).
std::uint64_t dice(std::uint64_t match_id, std::uint64_t j) {
    return protocol::mix_match_id(match_id * 0x100000001b3ULL + j);
}

}  // namespace

SoakFeed::SoakFeed(std::uint64_t slots, std::uint64_t events_per_match,
                   std::uint64_t first_match_id)
    : slots_(slots), events_per_match_(events_per_match), first_match_id_(first_match_id),
      half_end_(2 + (events_per_match - 6) / 2) {
    if (slots == 0) throw std::invalid_argument("the soak needs at least one match");
    if (events_per_match < 8) throw std::invalid_argument("a soak match needs at least 8 messages");
}

core::InboundMessage SoakFeed::in_play(std::uint64_t match_id, std::uint64_t j, core::Period period,
                                       std::uint32_t clock_ms) const {
    core::InboundMessage m;
    m.header.clock = {period, clock_ms};
    // Per match, on average: 2.7 goals, 0.2 red cards, 25 shots (or a shot every message when
    // a match has fewer); every other message is a clock sync.
    const std::uint64_t plays = events_per_match_ - 6;
    const std::uint64_t roll = dice(match_id, j) % 1'000'000;
    const core::Side side = (roll & 1) != 0 ? core::Side::home : core::Side::away;
    const std::uint64_t goal_below = 2'700'000 / plays;
    const std::uint64_t red_below = goal_below + 200'000 / plays;
    const std::uint64_t shot_below = red_below + 25'000'000 / plays;
    if (roll < goal_below) {
        m.body = core::Goal{side, false, false};
    } else if (roll < red_below) {
        m.body = core::RedCard{side, false};
    } else if (roll < shot_below) {
        m.body = core::ShotXg{side, 0.02 + static_cast<double>(roll % 37) / 100.0};
    } else {
        m.body = core::ClockSync{true};
    }
    return m;
}

core::InboundMessage SoakFeed::event(std::uint64_t index) const {
    const std::uint64_t slot = index % slots_;
    const std::uint64_t k = index / slots_;
    const std::uint64_t generation = k / events_per_match_;
    const std::uint64_t j = k % events_per_match_;
    const std::uint64_t match_id = first_match_id_ + generation * slots_ + slot;
    const std::uint64_t last = events_per_match_ - 1;

    core::InboundMessage m;
    // Positions: 0 setup, 1 kick-off, 2..half_end-1 first half, half_end its end, then the
    // second half's start, its play, its end (last - 1) and the final whistle (last).
    const std::uint64_t first_play = half_end_ - 2;  // in-play messages per half (first)
    const std::uint64_t second_play = last - 1 - (half_end_ + 2);  // ... and second
    if (j == 0) {
        core::MatchSetup setup;
        setup.home_name = "Soak Home";
        setup.away_name = "Soak Away";
        const std::uint64_t r = dice(match_id, 0);
        setup.prior = core::PriorMeans{0.8 + static_cast<double>(r % 97) / 100.0,
                                       0.6 + static_cast<double>(r / 97 % 89) / 100.0};
        m.body = setup;
    } else if (j == 1) {
        m.header.clock = {core::Period::first_half, 0};
        m.body = core::PeriodStart{core::Period::first_half};
    } else if (j < half_end_) {
        const auto clock = static_cast<std::uint32_t>(kHalfMs * (j - 1) / (first_play + 1));
        m = in_play(match_id, j, core::Period::first_half, clock);
    } else if (j == half_end_) {
        m.header.clock = {core::Period::first_half, kHalfMs};
        m.body = core::PeriodEnd{core::Period::first_half};
    } else if (j == half_end_ + 1) {
        m.header.clock = {core::Period::second_half, kHalfMs};
        m.body = core::PeriodStart{core::Period::second_half};
    } else if (j < last - 1) {
        const std::uint64_t n = j - (half_end_ + 1);
        const auto clock = static_cast<std::uint32_t>(kHalfMs + kHalfMs * n / (second_play + 1));
        m = in_play(match_id, j, core::Period::second_half, clock);
    } else if (j == last - 1) {
        m.header.clock = {core::Period::second_half, 2 * kHalfMs};
        m.body = core::PeriodEnd{core::Period::second_half};
    } else {
        m.header.clock = {core::Period::second_half, 2 * kHalfMs};
        m.body = core::FinalWhistle{};
    }
    m.header.match_id = match_id;
    m.header.source_seq = j + 1;
    m.header.source_time_us = kSourceEpochUs + static_cast<std::int64_t>(index);
    return m;
}

std::uint64_t SoakFeed::index_of(std::uint64_t match_id, std::uint64_t source_seq) const noexcept {
    if (match_id < first_match_id_ || source_seq == 0 || source_seq > events_per_match_)
        return kNotOurs;
    const std::uint64_t offset = match_id - first_match_id_;
    const std::uint64_t k = (offset / slots_) * events_per_match_ + (source_seq - 1);
    return k * slots_ + offset % slots_;
}

}  // namespace liveprob::soak
