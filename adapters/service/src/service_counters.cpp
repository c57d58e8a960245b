#include "liveprob/service/service_counters.hpp"

#include <numeric>
#include <string>

#include "liveprob/core/reject_reason.hpp"
#include "liveprob/protocol/decode_error.hpp"

namespace liveprob::service {

std::uint64_t ServiceCounters::decode_rejected_total() const noexcept {
    return std::accumulate(decode_rejected.begin(), decode_rejected.end(), std::uint64_t{0});
}

void list_counters(const ServiceCounters& s, const core::MatchCounters& e, CounterList& out) {
    out.clear();
    const auto add = [&out](std::string name, std::uint64_t value) {
        out.emplace_back(std::move(name), value);
    };
    add("ingest.frames", s.frames_received);
    add("ingest.multipart_dropped", s.multipart_dropped);
    add("ingest.rejected", s.decode_rejected_total());
    for (std::size_t i = 1; i < s.decode_rejected.size(); ++i) {
        add(std::string("ingest.rejected.") +
                protocol::decode_error_name(static_cast<protocol::DecodeError>(i)),
            s.decode_rejected[i]);
    }
    add("ingest.bad_ticket", s.bad_ticket);
    add("ingest.not_our_shard", s.not_our_shard);
    add("ingest.bad_setup", s.bad_setup);
    add("ingest.waiting_for_setup", s.waiting);
    add("ingest.waiting_overflow", s.waiting_overflow);
    add("ingest.waiting_expired", s.waiting_expired);
    add("ingest.over_match_cap", s.over_cap);
    add("ingest.after_retirement", s.after_retirement);
    add("engine.accepted", e.accepted);
    add("engine.late", e.late);
    add("engine.duplicate", e.duplicates);
    add("engine.conflicting_duplicate", e.conflicting_duplicates);
    add("engine.rejected", e.rejected);
    for (std::size_t i = 1; i < e.rejected_by_reason.size(); ++i) {
        if (e.rejected_by_reason[i] == 0) continue;  // the reasons that happened
        add(std::string("engine.rejected.") +
                reject_reason_name(static_cast<core::RejectReason>(i)),
            e.rejected_by_reason[i]);
    }
    add("publish.updates", s.updates_published);
    add("publish.ticks", s.ticks_published);
    add("snapshot.requests", s.snapshot_requests);
    add("snapshot.bad_requests", s.snapshot_bad_requests);
    add("snapshot.final_states", s.snapshot_final_states);
    add("journal.frames", s.journal_frames);
    add("journal.replayed", s.journal_replayed);
    add("journal.torn_bytes", s.journal_torn_bytes);
    add("journal.damaged_records", s.journal_damaged_records);
    add("journal.damaged_bytes", s.journal_damaged_bytes);
    add("journal.write_failed", s.journal_write_failed);
    add("journal.compactions", s.journal_compactions);
    add("journal.compacted_records", s.journal_compacted_records);
    add("journal.compaction_failed", s.journal_compaction_failed);
    add("final_states.kept", s.final_states_kept);
    add("final_states.write_failed", s.final_state_write_failed);
    add("ack.messages", s.acks_sent);
    add("ack.durable", s.acked_durable);
    add("ack.refused", s.acked_refused);
    add("ack.withheld", s.acks_withheld);
    add("curve.accepted", s.curve_accepted);
    add("curve.refused", s.curve_refused);
    add("matches", s.matches);
    add("matches.live", s.live_matches);
    add("matches.retired", s.retired);
    add("matches.stale", s.stale_matches);
    add("matches.dormant", s.dormant_matches);
    add("ticks.stopped_silent", s.ticks_stopped_silent);
}

}  // namespace liveprob::service
