#include "liveprob/files/journal.hpp"

#include <fmt/format.h>

#include <fcntl.h>
#include <unistd.h>
#include <cerrno>
#include <cstring>
#include <filesystem>
#include <vector>

#include "liveprob/protocol/framing.hpp"
#include "liveprob/protocol/whole_file.hpp"

namespace liveprob::files {

const char* journal_sync_name(JournalSync s) noexcept {
    const auto i = static_cast<std::size_t>(s);
    return i < kJournalSyncNames.size() ? kJournalSyncNames[i].data() : "unknown";
}

namespace {

std::string os_error() { return std::strerror(errno); }

}  // namespace

JournalWriter::JournalWriter(const std::string& path, JournalSync sync,
                             std::chrono::milliseconds sync_interval)
    : path_(path), sync_(sync), sync_interval_(sync_interval),
      last_sync_(std::chrono::steady_clock::now()) {
    fd_ = ::open(path.c_str(), O_WRONLY | O_CREAT | O_APPEND | O_CLOEXEC, 0644);
    if (fd_ < 0)
        throw JournalError(fmt::format("journal {}: cannot open for append: {}", path, os_error()));
    end_offset_ = ::lseek(fd_, 0, SEEK_END);
    if (end_offset_ < 0) end_offset_ = 0;  // a device (tests use /dev/full) has no end
}

JournalWriter::~JournalWriter() {
    if (fd_ < 0) return;
    try {
        sync();
    } catch (...) {  // a destructor must not throw; the shutdown path calls sync() itself first
    }
    ::close(fd_);
}

void JournalWriter::write_all(const std::uint8_t* data, std::size_t size) {
    while (size > 0) {
        const ssize_t n = ::write(fd_, data, size);
        if (n < 0) {
            if (errno == EINTR) continue;
            throw JournalError(fmt::format("journal {}: write failed: {}", path_, os_error()));
        }
        data += n;
        size -= static_cast<std::size_t>(n);
    }
}

void JournalWriter::append(std::span<const std::uint8_t> frame) {
    // One buffer, one write: a frame is never split between two write calls, so a kill leaves
    // either the whole frame or a torn one that replay detects.
    buffer_.clear();
    protocol::append_frame(buffer_, frame, kMaxJournalFrameBytes);
    try {
        write_all(buffer_.data(), buffer_.size());
        if (sync_ == JournalSync::every_message) {
            dirty_ = true;
            sync();
        }
    } catch (const JournalError&) {
        // Disk full or an I/O error part-way through: cut the frame off again, so the journal
        // holds exactly the messages the service applied, and a later frame (once space
        // returns) does not follow a torn one that replay stops at. If the cut fails too,
        // replay stops at the torn frame and says so.
        if (::ftruncate(fd_, end_offset_) != 0) { /* the write error below says enough */
        }
        throw;
    }
    end_offset_ += static_cast<off_t>(buffer_.size());
    ++frames_;
    bytes_ += buffer_.size();
    dirty_ = sync_ != JournalSync::every_message;
}

void JournalWriter::sync() {
    if (!dirty_) return;
    if (::fdatasync(fd_) != 0)
        throw JournalError(fmt::format("journal {}: fsync failed: {}", path_, os_error()));
    dirty_ = false;
    last_sync_ = std::chrono::steady_clock::now();
}

void JournalWriter::sync_if_due(std::chrono::steady_clock::time_point now) {
    if (sync_ == JournalSync::interval && dirty_ && now - last_sync_ >= sync_interval_) sync();
}

JournalReplayReport replay_journal(const std::string& path,
                                   const std::function<void(std::span<const std::uint8_t>)>& visit,
                                   bool truncate_tail) {
    JournalReplayReport report;
    std::error_code ec;
    // Nothing to replay from a missing file, nor from a device or pipe (which has no history).
    if (!std::filesystem::is_regular_file(path, ec)) return report;
    const std::vector<std::uint8_t> bytes = protocol::read_whole_file_bytes(path, "the journal");
    protocol::FrameCursor cursor(bytes, kMaxJournalFrameBytes);
    while (const auto frame = cursor.next()) {
        visit(frame->payload);
        ++report.frames;
    }
    report.valid_bytes = cursor.end_offset();
    report.torn_bytes = bytes.size() - cursor.end_offset();
    if (cursor.end() != protocol::StreamEnd::clean) report.torn_detail = cursor.end_detail();
    if (report.torn_bytes > 0 && truncate_tail)
        std::filesystem::resize_file(path, cursor.end_offset());
    return report;
}

}  // namespace liveprob::files
