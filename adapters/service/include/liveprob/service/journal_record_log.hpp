// The service core's record log (service_ports.hpp) on serve's journal folder
// (adapters/files/journal.hpp): the journal's errors become RecordLogError.
#pragma once

#include "liveprob/files/journal.hpp"
#include "liveprob/service/service_ports.hpp"

namespace liveprob::service {

class JournalRecordLog final : public RecordLog {
public:
    explicit JournalRecordLog(files::Journal& journal) : journal_(journal) {}

    void append(std::span<const std::uint8_t> record) override;
    bool awaiting_sync() const override { return journal_.awaiting_sync(); }
    void sync(std::chrono::steady_clock::time_point now, bool force) override;

private:
    files::Journal& journal_;
};

}  // namespace liveprob::service
