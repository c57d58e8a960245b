// The service's journal: every accepted inbound message, appended before it is applied, as one
// checksummed record (protocol/journal_format.hpp) in a folder of segment files that rotate at a
// size the operator sets. State is a fold of these records, so replaying the folder rebuilds
// every match exactly. Recovery never deletes a record it can read: a damaged record is skipped
// and counted, and only a torn tail (a last record cut short, or zero fill) is cut. A folder
// holding anything but journal segments under a segment's name, or a path that is a file, is
// refused and left untouched. One process at a time: the folder's `lock` file is held with
// flock(2) while the journal is open.
#pragma once

#include <sys/types.h>

#include <array>
#include <chrono>
#include <cstdint>
#include <filesystem>
#include <functional>
#include <span>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace liveprob::files {

// When the journal reaches the disk.
enum class JournalSync : std::uint8_t {
    none,  // leave flushing to the operating system (fastest; a machine crash may lose the tail)
    interval,       // write each record at once, fsync at most every `journal_sync_interval_ms`
    every_message,  // fsync after every record, before the message is applied
};
// The policies' names, in the enum's order (configuration values and logs).
inline constexpr std::array<std::string_view, 3> kJournalSyncNames = {"none", "interval",
                                                                      "every_message"};
const char* journal_sync_name(JournalSync s) noexcept;

struct JournalError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

inline constexpr std::uint64_t kDefaultJournalSegmentBytes = 64ull << 20;

struct JournalReplayReport {
    std::uint64_t segments = 0;         // segment files read
    std::uint64_t frames = 0;           // whole records handed to the visitor
    std::uint64_t damaged_records = 0;  // damaged regions skipped (each one or more records)
    std::uint64_t damaged_bytes = 0;    // their bytes, kept on disk
    std::uint64_t torn_bytes = 0;       // a torn tail of the last segment, cut
    std::vector<std::string> notes;     // one line per damaged region or cut tail, for the log
};

struct JournalCompactionReport {
    std::uint64_t segments_removed = 0;    // every record dropped
    std::uint64_t segments_rewritten = 0;  // some records dropped
    std::uint64_t segments_kept = 0;  // untouched: every record kept, or damage kept as evidence
    std::uint64_t records_kept = 0;
    std::uint64_t records_dropped = 0;
    std::uint64_t bytes_before = 0;
    std::uint64_t bytes_after = 0;
};

class Journal {
public:
    // Opens the journal at `path`: a folder (created when missing) of segments, locked for this
    // process. Throws JournalError, touching nothing, when the path is a file (a journal of the
    // previous format gets the command that converts it), when a segment lacks the journal's
    // header, or when another process holds the lock. A path that is a device or a pipe gets
    // the records alone (no header, no segments, no lock, nothing to replay): tests write to
    // /dev/full. `segment_bytes`: a segment is closed and the next one begun once the next
    // record would take it past this size.
    Journal(const std::filesystem::path& path, JournalSync sync,
            std::chrono::milliseconds sync_interval,
            std::uint64_t segment_bytes = kDefaultJournalSegmentBytes);
    ~Journal();
    Journal(const Journal&) = delete;
    Journal& operator=(const Journal&) = delete;

    // Hands every readable record, in order, to `visit`; cuts a torn tail of the last segment.
    // Call once, before the first append.
    JournalReplayReport replay(const std::function<void(std::span<const std::uint8_t>)>& visit);

    // Writes one record with one write(2) (no user-space buffer, so a kill -9 after append()
    // returns loses nothing; only a machine crash can, and the sync policy bounds that); with
    // `every_message` it is on disk when this returns. A failed write is cut back off.
    void append(std::span<const std::uint8_t> payload);
    // fsync now if anything was written since the last one (the interval timer and shutdown).
    void sync();
    // Called by the loop's timer; syncs when the policy is `interval` and the interval has passed.
    void sync_if_due(std::chrono::steady_clock::time_point now);
    // True while records written under `interval` wait for their fsync: acknowledging them to a
    // feed now would promise more than the policy gives (`none` promises the write alone,
    // `every_message` syncs in append()).
    bool awaiting_sync() const noexcept { return sync_ == JournalSync::interval && dirty_; }

    // Closes the segment being written (the next append begins a new one), then rewrites every
    // segment keeping only the records `keep` says yes to: a segment left with none is removed,
    // one left with all is untouched, one with damage is left as it is. Each rewrite replaces
    // the file atomically, so a crash leaves the old segment or the new one.
    JournalCompactionReport compact(const std::function<bool(std::span<const std::uint8_t>)>& keep);

    std::uint64_t frames_written() const noexcept { return frames_; }
    std::uint64_t bytes_written() const noexcept { return bytes_; }
    std::uint64_t segments_begun() const noexcept { return segments_begun_; }
    const std::filesystem::path& path() const noexcept { return path_; }

private:
    void open_for_append();
    void begin_segment();
    void close_segment();
    void write_all(const std::uint8_t* data, std::size_t size);
    void sync_folder();

    std::filesystem::path path_;
    bool device_ = false;  // a device or pipe: records only
    int lock_fd_ = -1;
    int fd_ = -1;  // the segment being written, or the device
    JournalSync sync_;
    std::chrono::milliseconds sync_interval_;
    std::uint64_t segment_bytes_;
    std::chrono::steady_clock::time_point last_sync_{};
    bool dirty_ = false;
    bool replayed_ = false;
    std::uint64_t next_segment_ = 1;     // number of the next segment to begin
    std::uint64_t segment_size_ = 0;     // bytes in the segment being written
    std::uint64_t segment_records_ = 0;  // records in it
    std::uint64_t frames_ = 0;
    std::uint64_t bytes_ = 0;
    std::uint64_t segments_begun_ = 0;
    std::vector<std::uint8_t> buffer_;  // one record, reused
};

}  // namespace liveprob::files
