#include "liveprob/service/journal_record_log.hpp"

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

}  // namespace liveprob::service
