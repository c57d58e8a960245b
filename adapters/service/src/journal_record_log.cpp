#include "liveprob/service/journal_record_log.hpp"

#include "liveprob/protocol/feed_codec.hpp"

namespace liveprob::service {

void JournalRecordLog::append(std::span<const std::uint8_t> record) {
    try {
        journal_.append(record);
    } catch (const files::JournalError& e) {
        throw RecordLogError(e.what());
    }
}

void JournalRecordLog::sync(std::chrono::steady_clock::time_point now, bool force) {
    try {
        if (force) {
            journal_.sync();
        } else {
            journal_.sync_if_due(now);
        }
    } catch (const files::JournalError& e) {
        throw RecordLogError(e.what());
    }
}

LogCompaction JournalRecordLog::compact(const std::function<bool(std::uint64_t)>& keep) {
    files::JournalCompactionReport report;
    try {
        report = journal_.compact([&keep](std::span<const std::uint8_t> record) {
            const protocol::FeedDecodeResult decoded = protocol::decode_feed_message(record);
            return !decoded.message || keep(decoded.message->header.match_id);
        });
    } catch (const std::exception& e) {  // JournalError, or a filesystem error mid-rewrite
        throw RecordLogError(e.what());
    }
    return {report.records_kept, report.records_dropped, report.bytes_before, report.bytes_after};
}

void JournalFinalStates::keep(std::uint64_t match_id, std::span<const std::uint8_t> update) {
    try {
        file_.append(match_id, update);
    } catch (const files::JournalError& e) {
        throw RecordLogError(e.what());
    }
}

void JournalFinalStates::sync() {
    try {
        file_.sync();
    } catch (const files::JournalError& e) {
        throw RecordLogError(e.what());
    }
}

}  // namespace liveprob::service
