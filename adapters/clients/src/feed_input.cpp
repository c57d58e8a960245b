#include "liveprob/clients/feed_input.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <span>
#include <stdexcept>
#include <thread>

#include <fmt/format.h>

#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/framing.hpp"

namespace liveprob::clients {

namespace {

std::runtime_error read_error(const std::string& path, int err) {
    return std::runtime_error(fmt::format("{}: cannot read: {}", path, std::strerror(err)));
}

std::uint32_t little_endian_u32(const char* p) {
    const auto* b = reinterpret_cast<const unsigned char*>(p);
    return static_cast<std::uint32_t>(b[0]) | static_cast<std::uint32_t>(b[1]) << 8 |
           static_cast<std::uint32_t>(b[2]) << 16 | static_cast<std::uint32_t>(b[3]) << 24;
}

}  // namespace

FeedInput::FeedInput(const std::string& path, std::optional<FeedInputForm> form,
                     FeedInputOptions options)
    : path_(path == "-" ? "standard input" : path), options_(options) {
    if (path == "-") {
        fd_ = STDIN_FILENO;
    } else {
        fd_ = ::open(path.c_str(), O_RDONLY | O_CLOEXEC);
        if (fd_ < 0)
            throw std::runtime_error(
                fmt::format("{}: cannot open: {}", path, std::strerror(errno)));
        owns_fd_ = true;
    }
    struct stat st {};
    regular_ = ::fstat(fd_, &st) == 0 && S_ISREG(st.st_mode);
    if (form) {
        form_ = *form;
        return;
    }
    // Told apart by the first buffer's identifier: 12 bytes, or fewer at the very end.
    while (unread() < 12 && fill()) {}
    const auto* first = reinterpret_cast<const std::uint8_t*>(pending_.data());
    form_ = protocol::looks_like_frame_stream(std::span(first, pending_.size()))
                ? FeedInputForm::frames
                : FeedInputForm::json_lines;
}

FeedInput::~FeedInput() {
    if (owns_fd_) ::close(fd_);
}

bool FeedInput::stopped() const noexcept {
    return options_.stop != nullptr && options_.stop->load(std::memory_order_relaxed);
}

void FeedInput::compact() {
    if (begin_ == 0) return;
    pending_.erase(0, begin_);
    begin_ = 0;
}

bool FeedInput::fill() {
    if (at_end_) return false;
    compact();
    const std::size_t old = pending_.size();
    pending_.resize(old + kBufferBytes);
    for (;;) {
        if (stopped()) break;
        const ::ssize_t got = ::read(fd_, pending_.data() + old, kBufferBytes);
        if (got > 0) {
            pending_.resize(old + static_cast<std::size_t>(got));
            read_total_ += static_cast<std::uint64_t>(got);
            return true;
        }
        if (got < 0 && errno == EINTR) continue;  // a signal: `stop` says whether to go on
        if (got < 0) {
            const int err = errno;
            pending_.resize(old);
            throw read_error(path_, err);
        }
        // The end for now. A followed regular file may grow; a pipe's end is final.
        if (!(options_.follow && regular_)) break;
        struct stat st {};
        if (::fstat(fd_, &st) == 0 && static_cast<std::uint64_t>(st.st_size) < read_total_) {
            pending_.resize(old);
            throw std::runtime_error(fmt::format(
                "{}: the file shrank below the {} bytes already read (truncated or replaced)",
                path_, read_total_));
        }
        std::this_thread::sleep_for(std::chrono::milliseconds(options_.follow_poll_ms));
    }
    pending_.resize(old);
    at_end_ = true;
    return false;
}

std::optional<FeedUnit> FeedInput::next() {
    return form_ == FeedInputForm::frames ? next_frame() : next_line();
}

std::optional<FeedUnit> FeedInput::next_line() {
    for (;;) {
        const std::size_t newline = pending_.find('\n', begin_ + scanned_);
        if (newline != std::string::npos || (at_end_ && unread() > 0)) {
            const std::size_t stop = newline != std::string::npos ? newline : pending_.size();
            FeedUnit unit;
            unit.number = ++units_;
            unit.offset = consumed_;
            std::string_view line(pending_.data() + begin_, stop - begin_);
            if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
            unit.bytes = line;
            const std::size_t taken = (newline != std::string::npos ? newline + 1 : stop) - begin_;
            consumed_ += taken;
            begin_ += taken;
            scanned_ = 0;
            return unit;
        }
        scanned_ = unread();
        if (unread() > kMaxLineBytes) {
            // Too long to be a feed line: drop it through its newline, report it once.
            FeedUnit unit;
            unit.number = ++units_;
            unit.offset = consumed_;
            unit.too_long = true;
            for (;;) {
                const std::size_t nl = pending_.find('\n', begin_);
                if (nl != std::string::npos) {
                    consumed_ += nl + 1 - begin_;
                    begin_ = nl + 1;
                    break;
                }
                consumed_ += unread();
                begin_ = pending_.size();
                if (!fill()) break;
            }
            scanned_ = 0;
            return unit;
        }
        if (!fill()) {
            if (unread() == 0) return std::nullopt;
        }
    }
}

std::optional<FeedUnit> FeedInput::next_frame() {
    while (unread() < protocol::kFramePrefixBytes) {
        if (!fill()) {
            if (unread() > 0) {
                end_detail_ = fmt::format("{}: torn_prefix at offset {}: {} stray bytes at the end",
                                          path_, consumed_, unread());
            }
            return std::nullopt;
        }
    }
    const std::uint32_t length = little_endian_u32(pending_.data() + begin_);
    if (length > protocol::kMaxFeedMessageBytes) {
        throw std::runtime_error(
            fmt::format("{}: oversize frame at offset {}: length {} beyond the {}-byte limit",
                        path_, consumed_, length, protocol::kMaxFeedMessageBytes));
    }
    while (unread() < protocol::kFramePrefixBytes + length) {
        if (!fill()) {
            end_detail_ =
                fmt::format("{}: torn_payload at offset {}: the frame promises {} bytes, {} remain",
                            path_, consumed_, length, unread() - protocol::kFramePrefixBytes);
            return std::nullopt;
        }
    }
    FeedUnit unit;
    unit.number = ++units_;
    unit.offset = consumed_;
    unit.bytes = std::string_view(pending_.data() + begin_ + protocol::kFramePrefixBytes, length);
    consumed_ += protocol::kFramePrefixBytes + length;
    begin_ += protocol::kFramePrefixBytes + length;
    return unit;
}

}  // namespace liveprob::clients
