// What the service core (service_core.hpp) needs from the process around it, as three small
// interfaces. The core reads no clock, writes no file and opens no socket: a shell (the ZeroMQ
// one in live_service.cpp, a cluster one, a test) implements these and the core calls them in
// the order its rules require.
#pragma once

#include <chrono>
#include <cstdint>
#include <functional>
#include <optional>
#include <span>
#include <stdexcept>
#include <string_view>
#include <vector>

#include "liveprob/protocol/update_codec.hpp"

namespace liveprob::service {

// A moment, as both clocks the service uses read it: the steady clock drives the match clock's
// drift, the tick, time-to-live, retention and silence; the wall clock stamps updates.
struct ServiceTime {
    std::chrono::steady_clock::time_point steady{};
    std::int64_t wall_us = 0;  // microseconds since the Unix epoch
};

class ServiceClock {
public:
    virtual ~ServiceClock() = default;
    // Read when a message or timer is handled, and again once its update is priced (the
    // update's compute time and publish time).
    virtual ServiceTime now() = 0;
};

// A failed write or sync of the record log; what() is logged.
struct RecordLogError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

// What one compaction of the record log did (RecordLog::compact).
struct LogCompaction {
    std::uint64_t records_kept = 0;
    std::uint64_t records_dropped = 0;
    std::uint64_t bytes_before = 0;
    std::uint64_t bytes_after = 0;
};

// The durable log every inbound message is written to before it is applied (serve's journal).
// A shell whose inbound messages are already durable before they reach it passes no log.
class RecordLog {
public:
    virtual ~RecordLog() = default;
    // Writes one record; throws RecordLogError when it cannot (the message is then neither
    // applied nor acknowledged, so the state stays one the log can rebuild).
    virtual void append(std::span<const std::uint8_t> record) = 0;
    // True while written records wait for a sync the policy has not made yet: acknowledging
    // them now would promise more than the policy gives.
    virtual bool awaiting_sync() const = 0;
    // Syncs what was written when the policy says it is time (`force`: now, whatever the
    // policy). Throws RecordLogError when the sync fails.
    virtual void sync(std::chrono::steady_clock::time_point now, bool force) = 0;
    // Drops from the log every record of a match `keep` says no to (journal compaction); what
    // a restart replays afterwards is the rest. A log that cannot compact keeps everything.
    // Throws RecordLogError when a segment cannot be rewritten (the log is then as it was, or
    // partly compacted: each segment is replaced atomically).
    virtual LogCompaction compact(const std::function<bool(std::uint64_t match_id)>& keep) {
        (void)keep;
        return {};
    }
};

// Where a match's final update goes when it leaves memory after the retention, so that a
// snapshot request for it is still answered and its records may be compacted out of the log
// (serve: files::FinalStateFile in the journal folder). Optional: without one, a retired match
// is unknown to snapshots and the log keeps its records.
class FinalStateStore {
public:
    virtual ~FinalStateStore() = default;
    // Writes the final update (protocol::UpdateEncoder bytes) of a match about to be forgotten;
    // throws RecordLogError when it cannot (the match then stays in memory for the next try).
    virtual void keep(std::uint64_t match_id, std::span<const std::uint8_t> update) = 0;
    // Makes what keep() wrote durable; throws RecordLogError when it cannot. Until it has
    // succeeded, nothing kept since may be compacted out of the log.
    virtual void sync() = 0;
    virtual bool holds(std::uint64_t match_id) const = 0;
    // The kept update, or nothing.
    virtual std::optional<std::vector<std::uint8_t>> find(std::uint64_t match_id) const = 0;
};

// Where the core's outward actions go. Byte spans are valid during the call only.
class ServiceActions {
public:
    virtual ~ServiceActions() = default;
    // One update of one match (the ZeroMQ shell sends it on the topic `match.<id>`); `meta` is
    // what the bytes say of the match, its sequence and timestamps.
    virtual void publish_update(const protocol::UpdateMeta& meta,
                                std::span<const std::uint8_t> update) = 0;
    // The service's counters (a protocol::CounterSet).
    virtual void publish_counters(std::span<const std::uint8_t> counters) = 0;
    // An acknowledgement (protocol::IngestAckContents) owed to the feed connection `peer`.
    virtual void acknowledge(std::string_view peer, std::span<const std::uint8_t> ack) = 0;
};

}  // namespace liveprob::service
