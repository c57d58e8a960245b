#include "liveprob/files/journal.hpp"

#include <fmt/format.h>

#include <fcntl.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>
#include <cerrno>
#include <cstring>

#include "liveprob/protocol/journal_format.hpp"
#include "liveprob/protocol/whole_file.hpp"

namespace liveprob::files {

namespace fs = std::filesystem;

const char* journal_sync_name(JournalSync s) noexcept {
    const auto i = static_cast<std::size_t>(s);
    return i < kJournalSyncNames.size() ? kJournalSyncNames[i].data() : "unknown";
}

namespace {

std::string os_error() { return std::strerror(errno); }

// The first bytes of a file, enough to tell what it is.
std::vector<std::uint8_t> first_bytes(const fs::path& path, std::size_t count) {
    std::vector<std::uint8_t> out(count);
    const int fd = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
    if (fd < 0)
        throw JournalError(fmt::format("journal {}: cannot read: {}", path.string(), os_error()));
    std::size_t got = 0;
    while (got < count) {
        const ssize_t n = ::read(fd, out.data() + got, count - got);
        if (n < 0 && errno == EINTR) continue;
        if (n <= 0) break;
        got += static_cast<std::size_t>(n);
    }
    ::close(fd);
    out.resize(got);
    return out;
}

[[noreturn]] void refuse_file(const fs::path& path) {
    const auto kind = protocol::classify_journal_file(first_bytes(path, 64));
    if (kind == protocol::JournalFileKind::previous_format) {
        throw JournalError(fmt::format(
            "journal {0}: a journal of the previous format (bare size-prefixed frames, no "
            "checksums); journals are now folders of checksummed segments: convert it with "
            "`liveprob convert {0} --form journal --out NEW_FOLDER` and pass --journal "
            "NEW_FOLDER (the file is left untouched)",
            path.string()));
    }
    throw JournalError(fmt::format(
        "journal {}: is a file ({}), not a journal folder; refusing to use it (left untouched)",
        path.string(), protocol::describe_journal_file_kind(kind)));
}

// Refuses a folder with a segment that is not one, before anything is read or changed.
void check_segment_headers(const fs::path& folder) {
    for (const auto& segment : protocol::list_journal_segments(folder)) {
        const auto kind = protocol::classify_journal_file(
            first_bytes(segment, protocol::kJournalHeaderBytes + 64));
        if (kind == protocol::JournalFileKind::segment || kind == protocol::JournalFileKind::empty)
            continue;
        throw JournalError(fmt::format(
            "journal {}: segment {} is {}; refusing to start (nothing read or changed){}",
            folder.string(), segment.filename().string(),
            protocol::describe_journal_file_kind(kind),
            kind == protocol::JournalFileKind::previous_format
                ? fmt::format("; convert it with `liveprob convert {} --form journal --out "
                              "NEW_FOLDER`",
                              segment.string())
                : ""));
    }
}

int take_lock(const fs::path& folder) {
    const fs::path lock = folder / "lock";
    const int fd = ::open(lock.c_str(), O_RDWR | O_CREAT | O_CLOEXEC, 0644);
    if (fd < 0) {
        throw JournalError(
            fmt::format("journal {}: cannot open its lock file: {}", folder.string(), os_error()));
    }
    if (::flock(fd, LOCK_EX | LOCK_NB) != 0) {
        const int err = errno;
        char holder[32] = {};
        const ssize_t n = ::pread(fd, holder, sizeof holder - 1, 0);
        ::close(fd);
        std::string pid = n > 0 ? std::string(holder, static_cast<std::size_t>(n)) : "unknown";
        while (!pid.empty() && (pid.back() == '\n' || pid.back() == ' ')) pid.pop_back();
        if (err == EWOULDBLOCK) {
            throw JournalError(fmt::format(
                "journal {}: in use by another process (pid {}, holding {}); one serve per "
                "journal",
                folder.string(), pid, lock.string()));
        }
        throw JournalError(fmt::format("journal {}: cannot lock {}: {}", folder.string(),
                                       lock.string(), std::strerror(err)));
    }
    const std::string pid = fmt::format("{}\n", ::getpid());
    if (::ftruncate(fd, 0) != 0 || ::pwrite(fd, pid.data(), pid.size(), 0) < 0) {
        // The pid is only a hint for the message above; the lock itself is held.
    }
    return fd;
}

}  // namespace

Journal::Journal(const fs::path& path, JournalSync sync, std::chrono::milliseconds sync_interval,
                 std::uint64_t segment_bytes)
    : path_(path), sync_(sync), sync_interval_(sync_interval),
      segment_bytes_(std::max<std::uint64_t>(segment_bytes, protocol::kJournalHeaderBytes + 1)),
      last_sync_(std::chrono::steady_clock::now()) {
    std::error_code ec;
    const auto status = fs::status(path, ec);
    if (fs::exists(status) && !fs::is_directory(status)) {
        if (fs::is_regular_file(status)) refuse_file(path);
        // A device or pipe: the records alone, nothing to lock or replay.
        device_ = true;
        fd_ = ::open(path.c_str(), O_WRONLY | O_APPEND | O_CLOEXEC);
        if (fd_ < 0) {
            throw JournalError(
                fmt::format("journal {}: cannot open for append: {}", path.string(), os_error()));
        }
        replayed_ = true;
        return;
    }
    fs::create_directories(path, ec);
    if (ec) {
        throw JournalError(
            fmt::format("journal {}: cannot create the folder: {}", path.string(), ec.message()));
    }
    lock_fd_ = take_lock(path);
    try {
        check_segment_headers(path);
        const auto segments = protocol::list_journal_segments(path);
        if (!segments.empty()) {
            next_segment_ =
                *protocol::journal_segment_number(segments.back().filename().string()) + 1;
        }
    } catch (...) {
        ::close(lock_fd_);
        throw;
    }
}

Journal::~Journal() {
    try {
        sync();
    } catch (...) {  // a destructor must not throw; the shutdown path calls sync() itself first
    }
    if (fd_ >= 0) ::close(fd_);
    if (lock_fd_ >= 0) ::close(lock_fd_);  // releases the lock
}

JournalReplayReport Journal::replay(
    const std::function<void(std::span<const std::uint8_t>)>& visit) {
    JournalReplayReport report;
    if (device_) return report;
    const auto segments = protocol::list_journal_segments(path_);
    for (std::size_t i = 0; i < segments.size(); ++i) {
        const auto bytes = protocol::read_whole_file_bytes(segments[i], "the journal segment");
        ++report.segments;
        if (bytes.empty()) continue;  // begun, header never written: holds nothing
        protocol::JournalRecordReader reader(bytes);
        while (const auto record = reader.next()) {
            visit(record->payload);
            ++report.frames;
        }
        const std::string name = segments[i].filename().string();
        report.damaged_records += reader.damaged_regions();
        report.damaged_bytes += reader.damaged_bytes();
        for (const auto& note : reader.damage_notes())
            report.notes.push_back(fmt::format("{}: {}", name, note));
        const std::uint64_t tail_bytes = bytes.size() - reader.tail_offset();
        if (reader.tail() == protocol::JournalTail::damaged) {
            ++report.damaged_records;
            report.damaged_bytes += tail_bytes;
        } else if (reader.tail() == protocol::JournalTail::torn) {
            if (i + 1 == segments.size()) {
                // Only the last segment was being written when a crash could tear it.
                fs::resize_file(segments[i], reader.tail_offset());
                report.torn_bytes += tail_bytes;
                report.notes.push_back(
                    fmt::format("{}: torn tail of {} bytes at offset {} cut (a record cut short)",
                                name, tail_bytes, reader.tail_offset()));
            } else {
                ++report.damaged_records;
                report.damaged_bytes += tail_bytes;
                report.notes.push_back(
                    fmt::format("{}: {} bytes at offset {} end the segment inside a record; kept",
                                name, tail_bytes, reader.tail_offset()));
            }
        }
    }
    replayed_ = true;
    return report;
}

void Journal::open_for_append() {
    if (replayed_) {
        const auto segments = protocol::list_journal_segments(path_);
        if (!segments.empty()) {
            const auto size = fs::file_size(segments.back());
            if (size < segment_bytes_) {
                fd_ = ::open(segments.back().c_str(), O_WRONLY | O_APPEND | O_CLOEXEC);
                if (fd_ < 0) {
                    throw JournalError(fmt::format("journal {}: cannot open {} for append: {}",
                                                   path_.string(), segments.back().string(),
                                                   os_error()));
                }
                segment_size_ = size;
                segment_records_ = 1;  // counts as begun: the next record may rotate it
                if (size == 0) {
                    buffer_.clear();
                    protocol::append_journal_header(buffer_);
                    write_all(buffer_.data(), buffer_.size());
                    segment_size_ = buffer_.size();
                    segment_records_ = 0;
                }
                return;
            }
        }
    }
    begin_segment();
}

void Journal::begin_segment() {
    const fs::path segment = path_ / protocol::journal_segment_name(next_segment_);
    fd_ = ::open(segment.c_str(), O_WRONLY | O_CREAT | O_EXCL | O_APPEND | O_CLOEXEC, 0644);
    if (fd_ < 0) {
        throw JournalError(fmt::format("journal {}: cannot create {}: {}", path_.string(),
                                       segment.string(), os_error()));
    }
    buffer_.clear();
    protocol::append_journal_header(buffer_);
    try {
        write_all(buffer_.data(), buffer_.size());
    } catch (const JournalError&) {
        // Disk full before even the header: leave no half-begun segment behind.
        ::close(fd_);
        fd_ = -1;
        ::unlink(segment.c_str());
        throw;
    }
    ++next_segment_;
    ++segments_begun_;
    segment_size_ = buffer_.size();
    segment_records_ = 0;
    if (sync_ != JournalSync::none) {
        dirty_ = true;
        sync();
        sync_folder();  // the new file's name, durable like its records
    }
}

void Journal::close_segment() {
    if (fd_ < 0 || device_) return;
    if (sync_ != JournalSync::none) sync();
    ::close(fd_);
    fd_ = -1;
    dirty_ = false;
}

void Journal::sync_folder() {
    const int dir = ::open(path_.c_str(), O_RDONLY | O_DIRECTORY | O_CLOEXEC);
    if (dir < 0) return;
    if (::fsync(dir) != 0) { /* the records themselves are synced; the name follows */
    }
    ::close(dir);
}

void Journal::write_all(const std::uint8_t* data, std::size_t size) {
    while (size > 0) {
        const ssize_t n = ::write(fd_, data, size);
        if (n < 0) {
            if (errno == EINTR) continue;
            throw JournalError(
                fmt::format("journal {}: write failed: {}", path_.string(), os_error()));
        }
        data += n;
        size -= static_cast<std::size_t>(n);
    }
}

void Journal::append(std::span<const std::uint8_t> payload) {
    if (fd_ < 0) open_for_append();
    const std::size_t record_bytes = protocol::kJournalRecordHeaderBytes + payload.size();
    if (!device_ && segment_records_ > 0 && segment_size_ + record_bytes > segment_bytes_) {
        close_segment();
        begin_segment();
    }
    // One buffer, one write: a record is never split between two write calls, so a kill leaves
    // either the whole record or a torn one that replay detects.
    buffer_.clear();
    protocol::append_journal_record(buffer_, payload);
    try {
        write_all(buffer_.data(), buffer_.size());
        if (sync_ == JournalSync::every_message) {
            dirty_ = true;
            sync();
        }
    } catch (const JournalError&) {
        // Disk full or an I/O error part-way through: cut the record off again, so the journal
        // holds exactly the messages the service applied. If the cut fails too, replay finds a
        // damaged record there and resynchronises on the next whole one.
        if (!device_ && ::ftruncate(fd_, static_cast<off_t>(segment_size_)) != 0) {}
        throw;
    }
    segment_size_ += buffer_.size();
    ++segment_records_;
    ++frames_;
    bytes_ += buffer_.size();
    dirty_ = sync_ != JournalSync::every_message;
}

void Journal::sync() {
    if (!dirty_ || fd_ < 0) return;
    if (::fdatasync(fd_) != 0 && !(device_ && errno == EINVAL)) {  // a device may not sync
        throw JournalError(fmt::format("journal {}: fsync failed: {}", path_.string(), os_error()));
    }
    dirty_ = false;
    last_sync_ = std::chrono::steady_clock::now();
}

void Journal::sync_if_due(std::chrono::steady_clock::time_point now) {
    if (sync_ == JournalSync::interval && dirty_ && now - last_sync_ >= sync_interval_) sync();
}

JournalCompactionReport Journal::compact(
    const std::function<bool(std::span<const std::uint8_t>)>& keep) {
    JournalCompactionReport report;
    if (device_) return report;
    close_segment();
    replayed_ = false;  // the next append begins a fresh segment
    for (const auto& segment : protocol::list_journal_segments(path_)) {
        const auto bytes = protocol::read_whole_file_bytes(segment, "the journal segment");
        report.bytes_before += bytes.size();
        if (protocol::classify_journal_file(bytes) != protocol::JournalFileKind::segment) {
            ++report.segments_kept;
            report.bytes_after += bytes.size();
            continue;
        }
        protocol::JournalRecordReader reader(bytes);
        std::vector<std::uint8_t> kept;
        protocol::append_journal_header(kept);
        std::uint64_t kept_records = 0, dropped = 0;
        while (const auto record = reader.next()) {
            if (keep(record->payload)) {
                protocol::append_journal_record(kept, record->payload);
                ++kept_records;
            } else {
                ++dropped;
            }
        }
        const bool damaged =
            reader.damaged_regions() > 0 || reader.tail() != protocol::JournalTail::clean;
        if (dropped == 0 || damaged) {
            // Nothing to drop, or damage an operator may want to look at: left as it is.
            ++report.segments_kept;
            report.records_kept += kept_records + dropped;
            report.bytes_after += bytes.size();
            continue;
        }
        report.records_kept += kept_records;
        report.records_dropped += dropped;
        if (kept_records == 0) {
            fs::remove(segment);
            ++report.segments_removed;
        } else {
            protocol::write_file_atomically(segment, kept, "the journal segment");
            ++report.segments_rewritten;
            report.bytes_after += kept.size();
        }
    }
    sync_folder();
    return report;
}

}  // namespace liveprob::files
