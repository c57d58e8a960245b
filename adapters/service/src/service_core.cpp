#include "liveprob/service/service_core.hpp"

#include <fmt/format.h>
#include <spdlog/spdlog.h>

#include <algorithm>

#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/sharding.hpp"

namespace liveprob::service {

namespace {
// Rare events are logged the first ten times and then every thousandth, so a flood of them
// cannot flood the log.
bool worth_logging(std::uint64_t seen) { return seen <= 10 || seen % 1000 == 0; }
}  // namespace

CoreSettings core_settings(const ServiceConfig& config) {
    CoreSettings settings;
    settings.limits.retention = std::chrono::seconds(config.retention_s);
    settings.limits.waiting_ttl = std::chrono::seconds(config.waiting_ttl_s);
    settings.limits.max_messages_per_match = config.match_message_cap;
    settings.feed_stale_after = std::chrono::seconds(config.feed_stale_s);
    settings.feed_dormant_after = std::chrono::seconds(config.feed_dormant_s);
    settings.compact_every = std::chrono::seconds(config.journal_compact_s);
    settings.clock_interpolation = config.clock_interpolation;
    const protocol::ShardSpec shard = protocol::parse_shard_spec(config.shard);
    if (shard.count > 1) {
        settings.owns = [shard](std::uint64_t id) { return protocol::owns(shard, id); };
    }
    return settings;
}

ServiceCore::ServiceCore(core::ModelParams params, CoreSettings settings, ServiceClock& clock,
                         ServiceActions& actions, RecordLog* log, FinalStateStore* final_states)
    : clock_(clock), actions_(actions), log_(log), final_states_(final_states),
      owns_(std::move(settings.owns)), compact_every_(settings.compact_every),
      last_compaction_(clock.now().steady), feed_stale_after_(settings.feed_stale_after),
      feed_dormant_after_(settings.feed_dormant_after),
      registry_(std::move(params), settings.limits) {
    registry_.set_clock_interpolation(settings.clock_interpolation);
}

void ServiceCore::restore(std::span<const std::uint8_t> record) {
    restoring_ = true;
    handle(record, true);
}

void ServiceCore::finish_restore() {
    restoring_ = false;
    // A rebuilt match continues its output sequence from the restart time in microseconds since
    // the Unix epoch, not from 1. The run before published fewer updates per match than
    // microseconds have passed since its own start, so the sequence only rises across restarts
    // and a subscriber that skips updates "not newer" than the last (protocol/README.md) takes
    // the restarted service's updates at once; it sees one forward jump, like a gap.
    const ServiceTime now = clock_.now();
    const auto restart_seq = static_cast<std::uint64_t>(now.wall_us);
    for (const std::uint64_t id : restored_) {
        if (LiveMatch* m = registry_.find(id)) {
            m->output_seq = std::max(m->output_seq, restart_seq);
            publish(*m, false, now);
        }
    }
    restored_.clear();
}

Intake ServiceCore::ingest(std::span<const std::uint8_t> bytes, std::optional<Delivery> delivery) {
    const Intake intake = handle(bytes, false);
    // Nothing is promised for a message that was not journaled: the feed resends it.
    if (delivery && intake != Intake::not_journaled)
        acks_.owe(delivery->peer, delivery->ticket, intake == Intake::durable);
    return intake;
}

Intake ServiceCore::handle(std::span<const std::uint8_t> bytes, bool from_log) {
    const ServiceTime received = clock_.now();
    protocol::FeedDecodeResult decoded = protocol::decode_feed_message(bytes);
    if (!decoded.message) {
        const auto kind = static_cast<std::size_t>(decoded.error);
        const std::uint64_t seen = ++counters_.decode_rejected[kind < kDecodeErrorKinds ? kind : 0];
        if (worth_logging(seen)) {
            spdlog::warn("dropped an inbound buffer of {} bytes{}: {} ({} so far)", bytes.size(),
                         from_log ? " from the journal" : "", decoded.detail, seen);
        }
        return Intake::refused;
    }
    const std::uint64_t match_id = decoded.message->header.match_id;
    if (owns_ && !owns_(match_id)) {
        ++counters_.not_our_shard;
        return Intake::refused;
    }
    // A match that has retired into the final-state store is over: a late resend of its setup
    // must not bring it back as a new match. Refused before the log, so the log never holds a
    // record of it written after its retirement.
    if (final_states_ != nullptr && final_states_->holds(match_id)) {
        ++counters_.after_retirement;
        if (from_log) ++retired_uncompacted_;  // written before it retired: compaction drops it
        return Intake::refused;
    }
    // Written before it is applied: what the engine has seen, the log has. A message that
    // cannot be written (disk full) is not applied either, so the state stays one a restart can
    // rebuild; the feed's resend, or the next message once space returns, goes on from there.
    if (!from_log && log_ != nullptr) {
        try {
            log_->append(bytes);
        } catch (const RecordLogError& e) {
            journal_failing_ = true;
            const std::uint64_t failed = ++counters_.journal_write_failed;
            if (worth_logging(failed))
                spdlog::error("{}; message not applied ({} so far)", e.what(), failed);
            return Intake::not_journaled;
        }
        ++counters_.journal_frames;
        journal_failing_ = false;
    }
    touched_.clear();
    const MessageOutcome outcome =
        registry_.handle(*decoded.message, received.wall_us, received.steady, touched_);
    switch (outcome) {
        case MessageOutcome::bad_setup:
            ++counters_.bad_setup;
            spdlog::warn("match {}: setup refused: {}", match_id, registry_.last_setup_error());
            break;
        case MessageOutcome::waiting: ++counters_.waiting; break;
        case MessageOutcome::waiting_overflow: ++counters_.waiting_overflow; break;
        case MessageOutcome::over_cap: ++counters_.over_cap; break;
        case MessageOutcome::created: spdlog::info("match {}: created", match_id); break;
        case MessageOutcome::applied:
        case MessageOutcome::duplicate:
        case MessageOutcome::rejected: break;
    }
    for (const std::uint64_t id : touched_) {
        if (restoring_) {
            restored_.insert(id);  // published once, by finish_restore()
        } else if (LiveMatch* m = registry_.find(id)) {
            publish(*m, false, received);
        }
    }
    return Intake::durable;
}

void ServiceCore::settle_acks() {
    if (acks_.empty()) return;
    if (log_ != nullptr && log_->awaiting_sync()) {
        sync_due();
        return;  // sync_due() sent them if the sync was due; otherwise its timer will
    }
    acks_.send(actions_, counters_);
}

void ServiceCore::sync_due() {
    if (log_ != nullptr) {
        try {
            log_->sync(clock_.now().steady, false);
        } catch (const RecordLogError& e) {
            sync_failed(e);
            return;
        }
        if (log_->awaiting_sync()) return;
    }
    if (!acks_.empty()) acks_.send(actions_, counters_);
}

void ServiceCore::sync_failed(const RecordLogError& e) {
    // The records are written; whether they reached the disk is unknown: promise nothing for
    // them, and the feeds resend (duplicates are harmless).
    spdlog::error("{}; acknowledgements withheld", e.what());
    acks_.withhold(counters_);
}

void ServiceCore::tick() {
    for (auto& [id, m] : registry_.matches()) {
        if (!m.live() || m.dormant) continue;
        const ServiceTime started = clock_.now();
        if (feed_dormant_after_.count() > 0 &&
            started.steady - m.last_heard >= feed_dormant_after_) {
            // Silent for so long that re-pricing it every tick is work for nobody (its last
            // updates said stale); its next message wakes it.
            m.dormant = true;
            ++counters_.ticks_stopped_silent;
            continue;
        }
        registry_.advance(m, started.steady);
        publish(m, true, started);
    }
    // Every update handed to the publisher by now: finished matches past the retention go,
    // each one's final update kept first when there is a store for it.
    const ServiceTime now = clock_.now();
    const RetireReport retired = registry_.retire(
        now.steady, [this, &now](LiveMatch& m) { return keep_final_state(m, now); });
    counters_.retired += retired.matches;
    counters_.waiting_expired += retired.waiting_expired;
    if (final_states_ != nullptr) {
        retired_uncompacted_ += retired.matches;
        settle_final_states(now.steady);
    }
}

bool ServiceCore::keep_final_state(LiveMatch& m, const ServiceTime& now) {
    if (final_states_ == nullptr) return true;
    m.match.price_into(outputs_);
    protocol::UpdateMeta meta = meta_of(m, now.steady);
    meta.publish_time_us = now.wall_us;
    try {
        final_states_->keep(m.match.match_id(), encoder_.encode(meta, outputs_, m.match.setup()));
    } catch (const RecordLogError& e) {
        // Kept in memory (and in the log) until a write succeeds: still answerable either way.
        const std::uint64_t failed = ++counters_.final_state_write_failed;
        if (worth_logging(failed))
            spdlog::error("{}; match {} stays in memory ({} so far)", e.what(), m.match.match_id(),
                          failed);
        return false;
    }
    ++counters_.final_states_kept;
    final_states_unsynced_ = true;
    return true;
}

void ServiceCore::settle_final_states(std::chrono::steady_clock::time_point now) {
    if (final_states_unsynced_) {
        try {
            final_states_->sync();
            final_states_unsynced_ = false;
        } catch (const RecordLogError& e) {
            // Retried on the next tick; until then the log keeps every record (no compaction),
            // so a restart rebuilds these matches from it.
            const std::uint64_t failed = ++counters_.final_state_write_failed;
            if (worth_logging(failed)) spdlog::error("{}; compaction waits", e.what());
            return;
        }
    }
    if (log_ == nullptr || compact_every_.count() == 0 || retired_uncompacted_ == 0 ||
        now - last_compaction_ < compact_every_)
        return;
    last_compaction_ = now;
    const auto started = clock_.now().steady;
    LogCompaction done;
    try {
        // Only matches whose final update is durable in the store: what a restart needs of
        // them is there, and the live and not yet retired matches keep every record.
        done = log_->compact(
            [this](std::uint64_t match_id) { return !final_states_->holds(match_id); });
    } catch (const RecordLogError& e) {
        ++counters_.journal_compaction_failed;
        spdlog::error("journal compaction failed (tried again in {} s): {}", compact_every_.count(),
                      e.what());
        return;
    }
    retired_uncompacted_ = 0;
    ++counters_.journal_compactions;
    counters_.journal_compacted_records += done.records_dropped;
    spdlog::info(
        "journal compacted in {} ms: {} records of retired matches dropped, {} kept; "
        "{} -> {} bytes",
        std::chrono::duration_cast<std::chrono::milliseconds>(clock_.now().steady - started)
            .count(),
        done.records_dropped, done.records_kept, done.bytes_before, done.bytes_after);
}

bool ServiceCore::add_final_state(std::uint64_t match_id) {
    if (final_states_ == nullptr) return false;
    const auto bytes = final_states_->find(match_id);
    if (!bytes) return false;
    auto decoded = protocol::decode_update(*bytes);
    if (!decoded.ok()) return false;
    snapshot_reply_.updates.push_back(std::move(*decoded.value));
    ++counters_.snapshot_final_states;
    return true;
}

bool ServiceCore::feed_stale(const LiveMatch& m, std::chrono::steady_clock::time_point now) const {
    if (feed_stale_after_.count() == 0) return false;
    // Silence is news only while play should be running: before kick-off and between periods
    // a feed may rightly say nothing for a long time.
    const core::MatchStatus status = m.match.state().status;
    if (status != core::MatchStatus::in_play && status != core::MatchStatus::shootout) return false;
    return now - m.last_heard >= feed_stale_after_;
}

protocol::UpdateMeta ServiceCore::meta_of(const LiveMatch& m,
                                          std::chrono::steady_clock::time_point now) const {
    protocol::UpdateMeta meta;
    meta.match_id = m.match.match_id();
    meta.output_seq = m.output_seq;
    meta.input_seq = m.input_seq;
    meta.receive_time_us = m.receive_time_us;
    meta.feed_stale = feed_stale(m, now);
    meta.journal_failing = journal_failing_;
    return meta;
}

void ServiceCore::publish(LiveMatch& m, bool tick, const ServiceTime& started) {
    m.match.price_into(outputs_);
    ++m.output_seq;
    protocol::UpdateMeta meta = meta_of(m, started.steady);
    if (tick) meta.receive_time_us = 0;
    const ServiceTime priced = clock_.now();
    meta.compute_ns = static_cast<std::uint32_t>(std::clamp<std::int64_t>(
        std::chrono::duration_cast<std::chrono::nanoseconds>(priced.steady - started.steady)
            .count(),
        0, 0xFFFF'FFFF));
    meta.publish_time_us = priced.wall_us;
    actions_.publish_update(meta, encoder_.encode(meta, outputs_, m.match.setup()));
    ++(tick ? counters_.ticks_published : counters_.updates_published);
}

std::vector<std::vector<std::uint8_t>> ServiceCore::answer_snapshot(
    std::span<const std::uint8_t> request) {
    ++counters_.snapshot_requests;
    const auto wanted = protocol::decode_snapshot_request(request);
    snapshot_reply_.updates.clear();
    snapshot_reply_.error.clear();
    const ServiceTime now = clock_.now();
    const auto add = [&](const LiveMatch& m) {
        m.match.price_into(outputs_);
        snapshot_reply_.updates.push_back(
            {meta_of(m, now.steady), outputs_, protocol::details_of(m.match.setup())});
    };
    if (!wanted.ok()) {
        ++counters_.snapshot_bad_requests;
        snapshot_reply_.error = "bad request: " + wanted.detail;
    } else if (*wanted.value == 0) {
        for (const auto& [id, m] : registry_.matches()) {
            if (m.live()) add(m);
        }
    } else if (const LiveMatch* m = registry_.find(*wanted.value)) {
        add(*m);
    } else if (!add_final_state(*wanted.value)) {
        snapshot_reply_.error = fmt::format("unknown match {}", *wanted.value);
    }
    for (auto& u : snapshot_reply_.updates) u.meta.publish_time_us = now.wall_us;
    return protocol::encode_snapshot_reply_parts(snapshot_reply_);
}

const CounterList& ServiceCore::counter_values() {
    counters_.matches = registry_.matches().size();
    counters_.live_matches = 0;
    counters_.stale_matches = 0;
    counters_.dormant_matches = 0;
    const auto now = clock_.now().steady;
    for (const auto& [id, m] : registry_.matches()) {
        if (!m.live()) continue;
        ++counters_.live_matches;
        counters_.stale_matches += feed_stale(m, now) ? 1u : 0u;
        counters_.dormant_matches += m.dormant ? 1u : 0u;
    }
    list_counters(counters_, registry_.totals(), counter_set_.values);
    return counter_set_.values;
}

void ServiceCore::publish_counters() {
    counter_values();
    counter_set_.publish_time_us = clock_.now().wall_us;
    const std::vector<std::uint8_t> bytes = protocol::encode_counters(counter_set_);
    actions_.publish_counters(bytes);
    std::string line;
    for (const auto& [name, value] : counter_set_.values) {
        if (value != 0) line += fmt::format(" {}={}", name, value);
    }
    spdlog::info("counters:{}", line);
}

void ServiceCore::finish() {
    if (log_ != nullptr) {
        try {
            log_->sync(clock_.now().steady, true);
        } catch (const RecordLogError& e) {
            sync_failed(e);
        }
    }
    if (final_states_ != nullptr && final_states_unsynced_) {
        try {
            final_states_->sync();
            final_states_unsynced_ = false;
        } catch (const RecordLogError& e) {
            spdlog::error("{}", e.what());  // the log still holds those matches' records
        }
    }
    acks_.send(actions_, counters_);
    publish_counters();  // the final figures, on the topic and in the log
}

}  // namespace liveprob::service
