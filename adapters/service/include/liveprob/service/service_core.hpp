// The live service's rules, without sockets: what `liveprob serve` does with each inbound
// message, each timer and each snapshot request, whatever carries them. It takes bytes and the
// time (through ServiceClock) and answers with actions (ServiceActions: updates and counters to
// publish, acknowledgements to send) and records to write before applying (RecordLog). The
// ZeroMQ shell (live_service.cpp) and a cluster shell only carry the actions out; the unit tests
// drive it on a simulated clock.
//
// The rules, in the order a message meets them:
//  1. verify and decode (protocol/), refused by reason (`ingest.rejected.<reason>`);
//  2. a match this process does not own: refused (`ingest.not_our_shard`);
//  3. written to the record log before anything is applied; a failed write leaves the message
//     unapplied and unacknowledged (`journal.write_failed`);
//  4. applied through the registry (match_registry.hpp): waiting room, per-match cap, the
//     engine's fold; every match whose state changed gets one update;
//  5. acknowledged, when the feed asked, once the log's sync policy is met.
// Timers: tick() republishes every live match with its clock moved on (except those whose feed
// has been silent past `feed_dormant_after`), then forgets finished matches past the retention
// (each one's final update first written to the final-state store, when there is one) and
// waiting messages past their time to live, then, every `compact_every`, compacts the log: the
// records of matches the store holds are dropped; sync_due() syncs the
// log on its interval and sends what that made durable; publish_counters().
// A match the final-state store holds is over: a snapshot request for it is answered with its
// final update, and a message for it is refused (`ingest.after_retirement`).
//
// One thread at a time: the core holds no lock.
#pragma once

#include <cstdint>
#include <functional>
#include <optional>
#include <span>
#include <string_view>
#include <unordered_set>
#include <vector>

#include "liveprob/core/params.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/service/ack_ledger.hpp"
#include "liveprob/service/match_registry.hpp"
#include "liveprob/service/service_config.hpp"
#include "liveprob/service/service_counters.hpp"
#include "liveprob/service/service_ports.hpp"

namespace liveprob::service {

struct CoreSettings {
    RegistryLimits limits;
    // A match in play (or in a shoot-out) whose feed has sent nothing for `feed_stale_after`
    // is marked stale in its updates; a live match silent for `feed_dormant_after` is no longer
    // ticked. Its next message clears both. Zero turns either off.
    std::chrono::seconds feed_stale_after{600};
    std::chrono::seconds feed_dormant_after{3600};
    // The match ids this process owns; messages of others are refused and counted
    // (`ingest.not_our_shard`). Empty: every id.
    std::function<bool(std::uint64_t match_id)> owns;
    // How often the log is compacted once matches have retired into the final-state store
    // (needs both a log and a store); zero: never.
    std::chrono::seconds compact_every{600};
    // The timer's re-pricing from an interpolant in the clock (`clock_interpolation`).
    bool clock_interpolation = false;
};
// The core's settings from serve's configuration (limits, `shard`).
CoreSettings core_settings(const ServiceConfig& config);

// What became of one inbound message, as its acknowledgement tells the feed.
enum class Intake : std::uint8_t {
    durable,        // written to the log (or applied, with no log)
    refused,        // never will be: not a valid message, or a match this process does not own
    not_journaled,  // the log write failed: not applied, not acknowledged, the feed resends
};

// A feed's request for an acknowledgement: its connection and the ticket it sent.
struct Delivery {
    std::string_view peer;
    std::uint64_t ticket = 0;
};

class ServiceCore {
public:
    // `log` may be null: nothing is written before applying, and messages are durable once
    // applied. `final_states` may be null: a retired match is then unknown to snapshots and
    // the log is never compacted. The clock, the actions, the log and the store must outlive
    // the core; the store must be open (its matches known) before the first restore().
    ServiceCore(core::ModelParams params, CoreSettings settings, ServiceClock& clock,
                ServiceActions& actions, RecordLog* log, FinalStateStore* final_states = nullptr);

    // Restart: a record read back from the log goes through the rules above, except that it
    // is not written again and nothing is published. Damaged records are the reader's business.
    void restore(std::span<const std::uint8_t> record);
    // After the last restored record: every match rebuilt since the first restore() continues
    // its output sequence from the wall clock in microseconds (so it only rises across
    // restarts) and is published once.
    void finish_restore();

    // One inbound message. With a delivery, its acknowledgement is owed to the feed.
    Intake ingest(std::span<const std::uint8_t> bytes, std::optional<Delivery> delivery = {});
    // Sends the acknowledgements owed, if the log's sync policy lets it promise them now
    // (otherwise sync_due() sends them). The shell calls it after a batch of ingest().
    void settle_acks();

    // Timers.
    void tick();
    void sync_due();
    void publish_counters();

    // A snapshot request (protocol::decode_snapshot_request) answered with a reply: one match,
    // or every live one, in parts (protocol::encode_snapshot_reply_parts) that are the frames of
    // one message, each under the frame limit however many matches are live. Counted.
    std::vector<std::vector<std::uint8_t>> answer_snapshot(std::span<const std::uint8_t> request);

    // Shutdown, after the last ingest(): syncs the log (on failure every acknowledgement owed is
    // withheld), sends what is owed, publishes the final counters.
    void finish();

    // The shell counts what only it sees (frames, envelopes, CURVE) here.
    ServiceCounters& counters() noexcept { return counters_; }
    // Every counter by name, the gauges (matches) counted now; valid until the next call.
    const CounterList& counter_values();
    // The last write to the record log failed (disk full, I/O error): messages are refused
    // until one is written again.
    bool journal_failing() const noexcept { return journal_failing_; }
    MatchRegistry& registry() noexcept { return registry_; }

private:
    // Rules 1 to 4; `from_log`: a restored record.
    Intake handle(std::span<const std::uint8_t> bytes, bool from_log);
    // Prices the match and publishes it; compute_ns runs from `started` (the message's arrival
    // or the tick's start) to the priced figures.
    void publish(LiveMatch& m, bool tick, const ServiceTime& started);
    // The update's meta as of `now`: sequence, timestamps, and how far the service vouches.
    protocol::UpdateMeta meta_of(const LiveMatch& m,
                                 std::chrono::steady_clock::time_point now) const;
    bool feed_stale(const LiveMatch& m, std::chrono::steady_clock::time_point now) const;
    // A failed sync: whether the written records are on disk is unknown, so promise nothing.
    void sync_failed(const RecordLogError& e);
    // The final update of a match about to be retired, into the store; false: keep it.
    bool keep_final_state(LiveMatch& m, const ServiceTime& now);
    // After retiring: the store synced, then the log compacted when due.
    void settle_final_states(std::chrono::steady_clock::time_point now);
    // A retired match's final update added to the snapshot reply; false when none is kept.
    bool add_final_state(std::uint64_t match_id);

    ServiceClock& clock_;
    ServiceActions& actions_;
    RecordLog* log_;
    FinalStateStore* final_states_;
    std::function<bool(std::uint64_t)> owns_;
    std::chrono::seconds compact_every_;
    std::chrono::steady_clock::time_point last_compaction_;
    std::uint64_t retired_uncompacted_ = 0;  // matches whose records the log may still hold
    bool final_states_unsynced_ = false;     // kept since the store's last successful sync
    std::chrono::seconds feed_stale_after_;
    std::chrono::seconds feed_dormant_after_;
    MatchRegistry registry_;
    ServiceCounters counters_;
    AckLedger acks_;
    protocol::UpdateEncoder encoder_;
    core::Outputs outputs_;  // one buffer for every match: a match holds no outputs of its own
    std::vector<std::uint64_t> touched_;
    protocol::CounterSet counter_set_;
    protocol::SnapshotReplyContents snapshot_reply_;
    bool restoring_ = false;
    bool journal_failing_ = false;
    std::unordered_set<std::uint64_t> restored_;  // matches rebuilt by the current restore
};

}  // namespace liveprob::service
