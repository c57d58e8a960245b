// The service's journal: every accepted inbound message, appended before it is applied, as one
// size-prefixed frame (protocol/framing.hpp: the same layout as recorded streams). State is a fold
// of these frames, so replaying the file rebuilds every match exactly.
#pragma once

#include <sys/types.h>

#include <array>
#include <chrono>
#include <cstdint>
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
    interval,       // write each frame at once, fsync at most every `journal_sync_interval_ms`
    every_message,  // fsync after every frame, before the message is applied
};
// The policies' names, in the enum's order (configuration values and logs).
inline constexpr std::array<std::string_view, 3> kJournalSyncNames = {"none", "interval",
                                                                      "every_message"};
const char* journal_sync_name(JournalSync s) noexcept;

struct JournalError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

// A frame longer than this is not a frame: the length field itself is damaged.
inline constexpr std::size_t kMaxJournalFrameBytes = 64 * 1024;  // protocol::kMaxFeedMessageBytes

// Appends frames with a plain write(2) per frame (no user-space buffer, so a kill -9 after
// append() returns loses nothing; only a machine crash can, and the sync policy bounds that).
class JournalWriter {
public:
    JournalWriter(const std::string& path, JournalSync sync,
                  std::chrono::milliseconds sync_interval);
    ~JournalWriter();
    JournalWriter(const JournalWriter&) = delete;
    JournalWriter& operator=(const JournalWriter&) = delete;

    // Writes one frame; with `every_message` it is on disk when this returns.
    void append(std::span<const std::uint8_t> frame);
    // fsync now if anything was written since the last one (the interval timer and shutdown).
    void sync();
    // Called by the loop's timer; syncs when the policy is `interval` and the interval has passed.
    void sync_if_due(std::chrono::steady_clock::time_point now);

    std::uint64_t frames_written() const noexcept { return frames_; }
    std::uint64_t bytes_written() const noexcept { return bytes_; }

private:
    void write_all(const std::uint8_t* data, std::size_t size);

    std::string path_;
    int fd_ = -1;
    JournalSync sync_;
    std::chrono::milliseconds sync_interval_;
    std::chrono::steady_clock::time_point last_sync_{};
    bool dirty_ = false;
    std::uint64_t frames_ = 0;
    std::uint64_t bytes_ = 0;
    std::vector<std::uint8_t> buffer_;  // one frame, reused
    off_t end_offset_ = 0;  // where the next frame starts: a failed write is cut back to it
};

struct JournalReplayReport {
    std::uint64_t frames = 0;       // whole frames handed to the visitor
    std::uint64_t valid_bytes = 0;  // file length up to the end of the last whole frame
    std::uint64_t torn_bytes = 0;   // bytes after it (a frame cut short by a crash), truncated
    std::string torn_detail;        // why the tail was cut, for the log; empty when clean
};

// Reads every whole frame in order. A torn or damaged tail (short length field, length beyond
// the file or beyond kMaxJournalFrameBytes) ends the replay; when `truncate_tail` is set the
// file is cut back to the last whole frame so appends continue from a clean end. A missing
// file is an empty journal.
JournalReplayReport replay_journal(const std::string& path,
                                   const std::function<void(std::span<const std::uint8_t>)>& visit,
                                   bool truncate_tail);

}  // namespace liveprob::files
