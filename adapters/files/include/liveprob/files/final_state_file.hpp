// The final updates of matches that have left the service's memory, kept so that a snapshot
// request for one is still answered after its retention (adapters/service/service_core.hpp),
// and so that journal compaction may drop the match's feed records. One file in the journal
// folder, `final-states.lpj`, in the journal's record format (protocol/journal_format.hpp:
// header, then checksummed records); each record's payload is the match id (u64 LE) followed by
// the match's final Update buffer (update.fbs). Only an index (match id -> record offset) is
// held in memory; an answer reads its record back with one pread. Appended only. On opening, a
// damaged record is skipped and counted (that match is unknown again; its feed records were
// never compacted away unless its record was whole), a torn tail is cut, and a file that is not
// in the journal's format is refused and left untouched. The journal folder's lock covers it.
#pragma once

#include <cstdint>
#include <filesystem>
#include <optional>
#include <span>
#include <string_view>
#include <unordered_map>
#include <vector>

#include "liveprob/files/journal.hpp"

namespace liveprob::files {

class FinalStateFile {
public:
    static constexpr std::string_view kFileName = "final-states.lpj";

    // Opens (creating when missing) `folder`/final-states.lpj and indexes it. `sync`: whether
    // sync() reaches the disk (`none`: left to the operating system, as for the journal).
    // Throws JournalError, touching nothing, on a file of another format.
    FinalStateFile(const std::filesystem::path& folder, JournalSync sync);
    ~FinalStateFile();
    FinalStateFile(const FinalStateFile&) = delete;
    FinalStateFile& operator=(const FinalStateFile&) = delete;

    // Writes one match's final update (one write(2)); throws JournalError when it cannot (the
    // partial record is cut off again). A second record of a match replaces the first's answer.
    void append(std::uint64_t match_id, std::span<const std::uint8_t> update);
    // fdatasync if anything was written since the last one (never under `none`); throws
    // JournalError when it fails.
    void sync();
    // True while appended records wait for sync().
    bool awaiting_sync() const noexcept { return dirty_; }

    bool holds(std::uint64_t match_id) const { return index_.contains(match_id); }
    // The match's final Update buffer, or nothing when the file holds none for it (or its
    // record no longer reads back whole).
    std::optional<std::vector<std::uint8_t>> read(std::uint64_t match_id) const;

    std::size_t matches() const noexcept { return index_.size(); }
    std::uint64_t damaged_records() const noexcept { return damaged_records_; }
    std::uint64_t torn_bytes() const noexcept { return torn_bytes_; }
    std::uint64_t file_bytes() const noexcept { return size_; }
    const std::filesystem::path& path() const noexcept { return path_; }

private:
    std::filesystem::path path_;
    JournalSync sync_;
    int fd_ = -1;  // read and append
    std::uint64_t size_ = 0;
    bool dirty_ = false;
    std::uint64_t damaged_records_ = 0;
    std::uint64_t torn_bytes_ = 0;
    std::unordered_map<std::uint64_t, std::uint64_t> index_;  // match id -> record offset
    std::vector<std::uint8_t> buffer_;                        // one record, reused
};

}  // namespace liveprob::files
