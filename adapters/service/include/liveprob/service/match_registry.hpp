// The service's live matches: one engine Match per match id, plus what the runtime adds around
// it — the output sequence, the last input it reflects, and the clock anchor the timer drifts
// from. No sockets here: the service hands in decoded messages and the local time, and asks
// what to publish. Replay of the journal goes through the same calls, so a restarted service
// folds exactly the state an uninterrupted one holds.
#pragma once

#include <chrono>
#include <cstdint>
#include <deque>
#include <functional>
#include <memory>
#include <optional>
#include <string>
#include <unordered_map>
#include <vector>

#include "liveprob/core/match.hpp"

namespace liveprob::service {

// Messages that arrive before their match's setup wait here (bounded) and are applied, in
// arrival order, once the setup arrives.
inline constexpr std::size_t kMaxWaitingPerMatch = 256;
inline constexpr std::size_t kMaxWaitingMatches = 1024;

// What the operator bounds (service_config.hpp holds the keys). Zero turns a bound off.
struct RegistryLimits {
    // A finished or abandoned match leaves memory this long after its final update.
    std::chrono::seconds retention{600};
    // Messages held for a setup that has not come are dropped this long after the first one, so
    // junk ids cannot fill the room for good.
    std::chrono::seconds waiting_ttl{60};
    // Messages one match accepts (of any verdict); past it they are refused and counted, so one
    // runaway feed cannot make its re-folds stall the loop for every other match.
    std::uint32_t max_messages_per_match = 50000;
};

// What retire() removed, for the counters.
struct RetireReport {
    std::uint64_t matches = 0;          // finished or abandoned, past the retention
    std::uint64_t waiting_expired = 0;  // held messages whose setup never came in time
};

enum class MessageOutcome : std::uint8_t {
    applied,           // accepted or late: the state changed, publish an update
    duplicate,         // nothing changed
    rejected,          // the engine refused it (reason counted by the match)
    created,           // a setup created the match: publish its first update
    bad_setup,         // the setup is unusable (no prior, bad format); nothing created
    waiting,           // no setup yet: held until it arrives
    waiting_overflow,  // no setup yet and the waiting room is full: dropped
    over_cap,          // the match has had its share of messages: refused, state unchanged
};

struct LiveMatch {
    explicit LiveMatch(core::Match m) : match(std::move(m)) {}
    core::Match match;
    std::uint64_t output_seq = 0;      // last published output sequence
    std::uint64_t input_seq = 0;       // source_seq of the last message applied
    std::int64_t receive_time_us = 0;  // when that message arrived (0 once a tick is published)
    // The timer's clock: the feed clock as of the last applied message, advanced by local
    // elapsed time since it arrived.
    core::MatchClock anchor_clock;
    std::chrono::steady_clock::time_point anchor_time{};
    // When the match was first seen finished or abandoned (its final update); unset while live.
    std::optional<std::chrono::steady_clock::time_point> ended_at;
    std::uint32_t messages = 0;  // every message handed to the match, setup included
    // When the feed last sent anything for the match (any verdict: a duplicate shows the feed
    // is alive too); the service marks a long silence stale and then stops ticking.
    std::chrono::steady_clock::time_point last_heard{};
    bool dormant = false;  // silent so long it is no longer ticked; its next message wakes it
    bool live() const noexcept;
};

class MatchRegistry {
public:
    explicit MatchRegistry(core::ModelParams params, RegistryLimits limits = {})
        : params_(std::move(params)), limits_(limits) {}

    // `receive_time_us` is wall time for the update's timestamp; `now` anchors the clock.
    // Messages released from the waiting room by a setup are applied too; `touched` lists
    // every match whose state changed (to publish).
    MessageOutcome handle(const core::InboundMessage& message, std::int64_t receive_time_us,
                          std::chrono::steady_clock::time_point now,
                          std::vector<std::uint64_t>& touched);

    // Moves a live match's clock to its anchor plus elapsed time; true when the clock moved.
    bool advance(LiveMatch& m, std::chrono::steady_clock::time_point now);

    // Matches created from now on re-price their clock's drift from an interpolant
    // (core::Match::set_clock_interpolation); off by default.
    void set_clock_interpolation(bool on) noexcept { clock_interpolation_ = on; }

    LiveMatch* find(std::uint64_t match_id);
    std::unordered_map<std::uint64_t, LiveMatch>& matches() noexcept { return matches_; }
    std::size_t waiting_messages() const noexcept { return waiting_count_; }
    const std::string& last_setup_error() const noexcept { return last_setup_error_; }

    // Forgets finished matches past the retention and waiting messages past their TTL. The
    // service calls it after publishing, so every retired match's final update is out (and
    // journaled: messages are written before they are applied). `before_forgetting`, when
    // given, sees each match about to go; returning false keeps it (for the next call).
    RetireReport retire(std::chrono::steady_clock::time_point now,
                        const std::function<bool(LiveMatch&)>& before_forgetting = {});

    // Engine verdict totals over all matches (the counters topic), retired ones included.
    core::MatchCounters totals() const;

private:
    MessageOutcome apply_to(LiveMatch& m, const core::InboundMessage& message,
                            std::int64_t receive_time_us,
                            std::chrono::steady_clock::time_point now);

    struct Waiting {
        std::chrono::steady_clock::time_point since;  // the first held message's arrival
        std::deque<core::InboundMessage> messages;
    };

    core::ModelParams params_;
    bool clock_interpolation_ = false;
    RegistryLimits limits_;
    std::unordered_map<std::uint64_t, LiveMatch> matches_;
    std::unordered_map<std::uint64_t, Waiting> waiting_;
    core::MatchCounters retired_totals_;
    std::size_t waiting_count_ = 0;
    std::string last_setup_error_;
};

}  // namespace liveprob::service
