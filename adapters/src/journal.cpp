#include "liveprob/adapters/journal.hpp"

#include <fmt/format.h>

#include <array>
#include <cerrno>
#include <cstring>
#include <fcntl.h>
#include <filesystem>
#include <fstream>
#include <unistd.h>
#include <vector>

namespace liveprob::adapters {

namespace {

std::array<std::uint8_t, 4> little_endian(std::uint32_t v) {
    return {static_cast<std::uint8_t>(v), static_cast<std::uint8_t>(v >> 8),
            static_cast<std::uint8_t>(v >> 16), static_cast<std::uint8_t>(v >> 24)};
}

std::uint32_t read_little_endian(const std::uint8_t* p) {
    return static_cast<std::uint32_t>(p[0]) | (static_cast<std::uint32_t>(p[1]) << 8) |
           (static_cast<std::uint32_t>(p[2]) << 16) | (static_cast<std::uint32_t>(p[3]) << 24);
}

std::string os_error() { return std::strerror(errno); }

}  // namespace

JournalWriter::JournalWriter(const std::string& path, JournalSync sync,
                             std::chrono::milliseconds sync_interval)
    : path_(path), sync_(sync), sync_interval_(sync_interval), last_sync_(std::chrono::steady_clock::now()) {
    fd_ = ::open(path.c_str(), O_WRONLY | O_CREAT | O_APPEND | O_CLOEXEC, 0644);
    if (fd_ < 0) throw JournalError(fmt::format("journal {}: cannot open for append: {}", path, os_error()));
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
    if (frame.size() > kMaxJournalFrameBytes) {
        throw JournalError(fmt::format("journal {}: frame of {} bytes is over the limit", path_, frame.size()));
    }
    // One buffer, one write: a frame is never split between two write calls, so a kill leaves
    // either the whole frame or a torn one that replay detects.
    thread_local std::vector<std::uint8_t> buffer;
    buffer.resize(4 + frame.size());
    const auto prefix = little_endian(static_cast<std::uint32_t>(frame.size()));
    std::memcpy(buffer.data(), prefix.data(), 4);
    if (!frame.empty()) std::memcpy(buffer.data() + 4, frame.data(), frame.size());
    write_all(buffer.data(), buffer.size());
    ++frames_;
    bytes_ += buffer.size();
    dirty_ = true;
    if (sync_ == JournalSync::every_message) sync();
}

void JournalWriter::sync() {
    if (!dirty_) return;
    if (::fdatasync(fd_) != 0) throw JournalError(fmt::format("journal {}: fsync failed: {}", path_, os_error()));
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
    if (!std::filesystem::exists(path, ec)) return report;
    std::ifstream in(path, std::ios::binary);
    if (!in) throw JournalError(fmt::format("journal {}: cannot open for replay", path));
    const std::uint64_t file_size = std::filesystem::file_size(path);

    std::vector<std::uint8_t> frame;
    std::array<std::uint8_t, 4> prefix{};
    std::uint64_t offset = 0;
    while (offset < file_size) {
        const std::uint64_t left = file_size - offset;
        if (left < 4) {
            report.torn_detail = fmt::format("{} stray bytes after the last frame", left);
            break;
        }
        in.read(reinterpret_cast<char*>(prefix.data()), 4);
        const std::uint32_t length = read_little_endian(prefix.data());
        if (length > kMaxJournalFrameBytes) {
            report.torn_detail = fmt::format("damaged length field ({} bytes) at offset {}", length, offset);
            break;
        }
        if (length > left - 4) {
            report.torn_detail = fmt::format("last frame cut short: {} of {} bytes at offset {}",
                                             left - 4, length, offset);
            break;
        }
        frame.resize(length);
        in.read(reinterpret_cast<char*>(frame.data()), static_cast<std::streamsize>(length));
        if (!in) throw JournalError(fmt::format("journal {}: read failed at offset {}", path, offset));
        visit(std::span<const std::uint8_t>(frame.data(), frame.size()));
        ++report.frames;
        offset += 4 + length;
    }
    report.valid_bytes = offset;
    report.torn_bytes = file_size - offset;
    if (report.torn_bytes > 0 && truncate_tail) {
        in.close();
        std::filesystem::resize_file(path, offset);
    }
    return report;
}

}  // namespace liveprob::adapters
