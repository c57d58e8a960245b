// The service core's record log and final-state store (service_ports.hpp) on serve's journal
// folder (adapters/files/journal.hpp, final_state_file.hpp): the files' errors become
// RecordLogError.
#pragma once

#include "liveprob/files/final_state_file.hpp"
#include "liveprob/files/journal.hpp"
#include "liveprob/service/service_ports.hpp"

namespace liveprob::service {

class JournalRecordLog final : public RecordLog {
public:
    explicit JournalRecordLog(files::Journal& journal) : journal_(journal) {}

    void append(std::span<const std::uint8_t> record) override;
    bool awaiting_sync() const override { return journal_.awaiting_sync(); }
    void sync(std::chrono::steady_clock::time_point now, bool force) override;
    // Each record's match id read from its feed message; a record that does not decode is
    // kept (it is evidence, and replay counts it).
    LogCompaction compact(const std::function<bool(std::uint64_t match_id)>& keep) override;

private:
    files::Journal& journal_;
};

class JournalFinalStates final : public FinalStateStore {
public:
    explicit JournalFinalStates(files::FinalStateFile& file) : file_(file) {}

    void keep(std::uint64_t match_id, std::span<const std::uint8_t> update) override;
    void sync() override;
    bool holds(std::uint64_t match_id) const override { return file_.holds(match_id); }
    std::optional<std::vector<std::uint8_t>> find(std::uint64_t match_id) const override {
        return file_.read(match_id);
    }

private:
    files::FinalStateFile& file_;
};

}  // namespace liveprob::service
