// What the service counts (beyond the engine's per-match verdicts), published on the counters
// topic and logged. Names are stable; adapters/service/README.md lists them.
#pragma once

#include <array>
#include <cstdint>
#include <string>
#include <utility>
#include <vector>

#include "liveprob/core/match.hpp"

namespace liveprob::service {

inline constexpr std::size_t kDecodeErrorKinds = 8;  // protocol::DecodeError values

struct ServiceCounters {
    std::uint64_t frames_received = 0;    // ingest messages of any kind
    std::uint64_t multipart_dropped = 0;  // a message, or a ticket and a message, per send
    std::uint64_t bad_ticket = 0;         // a delivery ticket that failed to decode
    std::uint64_t acks_sent = 0;          // acknowledgement messages (each names ranges)
    std::uint64_t acked_durable = 0;      // tickets acknowledged as journaled
    std::uint64_t acked_refused = 0;      // tickets acknowledged as refused for good
    std::uint64_t acks_withheld = 0;      // tickets never acknowledged (a failed fsync)
    std::array<std::uint64_t, kDecodeErrorKinds> decode_rejected{};  // by protocol::DecodeError
    std::uint64_t not_our_shard = 0;
    std::uint64_t bad_setup = 0;
    std::uint64_t waiting = 0;  // held for a setup that had not arrived
    std::uint64_t waiting_overflow = 0;
    std::uint64_t waiting_expired = 0;    // held past the waiting TTL, setup never came
    std::uint64_t over_cap = 0;           // refused: the match had its share of messages
    std::uint64_t retired = 0;            // finished matches that left memory after retention
    std::uint64_t final_states_kept = 0;  // retired matches' final updates written to the store
    std::uint64_t final_state_write_failed = 0;  // writes or syncs of the store that failed
    std::uint64_t after_retirement = 0;          // messages refused: their match had retired
    std::uint64_t snapshot_final_states = 0;     // snapshot answers read from the store
    std::uint64_t journal_compactions = 0;
    std::uint64_t journal_compacted_records = 0;  // records of retired matches dropped
    std::uint64_t journal_compaction_failed = 0;
    std::uint64_t updates_published = 0;  // event-driven updates
    std::uint64_t ticks_published = 0;    // timer republications
    std::uint64_t snapshot_requests = 0;
    std::uint64_t snapshot_bad_requests = 0;
    std::uint64_t journal_frames = 0;           // appended this run
    std::uint64_t journal_replayed = 0;         // replayed at start
    std::uint64_t journal_torn_bytes = 0;       // cut from the tail at start
    std::uint64_t journal_damaged_records = 0;  // damaged regions skipped at start (kept)
    std::uint64_t journal_damaged_bytes = 0;    // their bytes
    std::uint64_t journal_write_failed =
        0;  // not journalled (disk full, I/O error), so not applied
    std::uint64_t curve_refused = 0;
    std::uint64_t curve_accepted = 0;
    std::uint64_t live_matches = 0;
    std::uint64_t matches = 0;
    std::uint64_t stale_matches = 0;         // now: in play, feed silent past feed_stale_s
    std::uint64_t dormant_matches = 0;       // now: live, feed silent past feed_dormant_s
    std::uint64_t ticks_stopped_silent = 0;  // times a match went dormant (no longer ticked)

    std::uint64_t decode_rejected_total() const noexcept;
};

// Flattens the service's and the engine's counters into (name, value) pairs, reusing `out`.
using CounterList = std::vector<std::pair<std::string, std::uint64_t>>;
void list_counters(const ServiceCounters& service, const core::MatchCounters& engine,
                   CounterList& out);

}  // namespace liveprob::service
