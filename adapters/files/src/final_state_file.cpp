#include "liveprob/files/final_state_file.hpp"

#include <fmt/format.h>

#include <fcntl.h>
#include <unistd.h>
#include <cerrno>
#include <cstring>

#include "liveprob/protocol/journal_format.hpp"
#include "liveprob/protocol/whole_file.hpp"

namespace liveprob::files {

namespace fs = std::filesystem;

namespace {

constexpr std::size_t kIdBytes = 8;

std::uint64_t read_le64(const std::uint8_t* p) {
    std::uint64_t v = 0;
    for (int i = 7; i >= 0; --i) v = (v << 8) | p[i];
    return v;
}

void append_le64(std::vector<std::uint8_t>& out, std::uint64_t v) {
    for (int i = 0; i < 8; ++i) out.push_back(static_cast<std::uint8_t>(v >> (8 * i)));
}

std::uint32_t read_le32(const std::uint8_t* p) {
    return static_cast<std::uint32_t>(p[0]) | static_cast<std::uint32_t>(p[1]) << 8 |
           static_cast<std::uint32_t>(p[2]) << 16 | static_cast<std::uint32_t>(p[3]) << 24;
}

// pread of exactly `size` bytes; false when the file ends first or the read fails.
bool read_at(int fd, std::uint8_t* out, std::size_t size, std::uint64_t offset) {
    while (size > 0) {
        const ssize_t n = ::pread(fd, out, size, static_cast<off_t>(offset));
        if (n < 0 && errno == EINTR) continue;
        if (n <= 0) return false;
        out += n;
        size -= static_cast<std::size_t>(n);
        offset += static_cast<std::uint64_t>(n);
    }
    return true;
}

}  // namespace

FinalStateFile::FinalStateFile(const fs::path& folder, JournalSync sync)
    : path_(folder / kFileName), sync_(sync) {
    std::error_code ec;
    std::vector<std::uint8_t> bytes;
    if (fs::exists(path_, ec)) bytes = protocol::read_whole_file_bytes(path_, "the final states");
    const auto kind = protocol::classify_journal_file(bytes);
    if (kind != protocol::JournalFileKind::segment && kind != protocol::JournalFileKind::empty) {
        throw JournalError(
            fmt::format("{}: is {}, not a file of final states; refusing to use it "
                        "(left untouched)",
                        path_.string(), protocol::describe_journal_file_kind(kind)));
    }
    std::uint64_t keep_bytes = bytes.size();
    if (!bytes.empty()) {
        protocol::JournalRecordReader reader(bytes);
        while (const auto record = reader.next()) {
            if (record->payload.size() <= kIdBytes) {
                ++damaged_records_;  // whole, checksummed, but not one of ours
                continue;
            }
            index_[read_le64(record->payload.data())] = record->offset;
        }
        damaged_records_ += reader.damaged_regions();
        if (reader.tail() == protocol::JournalTail::torn) {
            keep_bytes = reader.tail_offset();
            torn_bytes_ = bytes.size() - keep_bytes;
        } else if (reader.tail() == protocol::JournalTail::damaged) {
            ++damaged_records_;
        }
    }
    fd_ = ::open(path_.c_str(), O_RDWR | O_CREAT | O_APPEND | O_CLOEXEC, 0644);
    if (fd_ < 0) {
        throw JournalError(
            fmt::format("{}: cannot open: {}", path_.string(), std::strerror(errno)));
    }
    if (torn_bytes_ > 0 && ::ftruncate(fd_, static_cast<off_t>(keep_bytes)) != 0) {
        const int err = errno;
        ::close(fd_);
        throw JournalError(fmt::format("{}: cannot cut a torn tail of {} bytes: {}", path_.string(),
                                       torn_bytes_, std::strerror(err)));
    }
    size_ = keep_bytes;
    if (size_ == 0) {
        buffer_.clear();
        protocol::append_journal_header(buffer_);
        if (::write(fd_, buffer_.data(), buffer_.size()) != static_cast<ssize_t>(buffer_.size())) {
            const int err = errno;
            if (::ftruncate(fd_, 0) != 0) {}
            ::close(fd_);
            throw JournalError(
                fmt::format("{}: cannot write its header: {}", path_.string(), std::strerror(err)));
        }
        size_ = buffer_.size();
        dirty_ = true;
    }
}

FinalStateFile::~FinalStateFile() {
    try {
        sync();
    } catch (...) {  // a destructor must not throw; serve's shutdown syncs first
    }
    if (fd_ >= 0) ::close(fd_);
}

void FinalStateFile::append(std::uint64_t match_id, std::span<const std::uint8_t> update) {
    std::vector<std::uint8_t> payload;
    payload.reserve(kIdBytes + update.size());
    append_le64(payload, match_id);
    payload.insert(payload.end(), update.begin(), update.end());
    buffer_.clear();
    protocol::append_journal_record(buffer_, payload);
    const std::uint8_t* data = buffer_.data();
    std::size_t left = buffer_.size();
    while (left > 0) {
        const ssize_t n = ::write(fd_, data, left);
        if (n < 0 && errno == EINTR) continue;
        if (n < 0) {
            const int err = errno;
            // Cut the partial record off again, so the next one starts on a record boundary.
            if (::ftruncate(fd_, static_cast<off_t>(size_)) != 0) {}
            throw JournalError(
                fmt::format("{}: write failed: {}", path_.string(), std::strerror(err)));
        }
        data += n;
        left -= static_cast<std::size_t>(n);
    }
    index_[match_id] = size_;
    size_ += buffer_.size();
    dirty_ = true;
}

void FinalStateFile::sync() {
    if (!dirty_) return;
    if (sync_ != JournalSync::none && ::fdatasync(fd_) != 0) {
        throw JournalError(
            fmt::format("{}: fsync failed: {}", path_.string(), std::strerror(errno)));
    }
    dirty_ = false;
}

std::optional<std::vector<std::uint8_t>> FinalStateFile::read(std::uint64_t match_id) const {
    const auto it = index_.find(match_id);
    if (it == index_.end()) return std::nullopt;
    // The record read back and checked as the journal reader checks one: behind a header, so
    // its marker, length and checksum are verified before the update is handed out.
    std::vector<std::uint8_t> bytes;
    protocol::append_journal_header(bytes);
    const std::size_t at = bytes.size();
    bytes.resize(at + protocol::kJournalRecordHeaderBytes);
    if (!read_at(fd_, bytes.data() + at, protocol::kJournalRecordHeaderBytes, it->second))
        return std::nullopt;
    const std::uint32_t length = read_le32(bytes.data() + at + 4);
    if (length <= kIdBytes || length > protocol::kMaxJournalPayloadBytes) return std::nullopt;
    bytes.resize(bytes.size() + length);
    if (!read_at(fd_, bytes.data() + at + protocol::kJournalRecordHeaderBytes, length,
                 it->second + protocol::kJournalRecordHeaderBytes))
        return std::nullopt;
    protocol::JournalRecordReader reader(bytes);
    const auto record = reader.next();
    if (!record || record->offset != at || read_le64(record->payload.data()) != match_id)
        return std::nullopt;
    return std::vector<std::uint8_t>(record->payload.begin() + kIdBytes, record->payload.end());
}

}  // namespace liveprob::files
