#include "liveprob/protocol/framing.hpp"

#include <cstring>
#include <stdexcept>

#include <fmt/format.h>

namespace liveprob::protocol {

namespace {

std::uint32_t read_le32(const std::uint8_t* p) noexcept {
    return static_cast<std::uint32_t>(p[0]) | (static_cast<std::uint32_t>(p[1]) << 8) |
           (static_cast<std::uint32_t>(p[2]) << 16) | (static_cast<std::uint32_t>(p[3]) << 24);
}

}  // namespace

void append_frame(std::vector<std::uint8_t>& stream, std::span<const std::uint8_t> payload,
                  std::size_t max_payload) {
    if (payload.size() > max_payload) {
        throw std::length_error(
            fmt::format("frame of {} bytes exceeds the limit of {}", payload.size(), max_payload));
    }
    const auto n = static_cast<std::uint32_t>(payload.size());
    const std::uint8_t prefix[kFramePrefixBytes] = {
        static_cast<std::uint8_t>(n), static_cast<std::uint8_t>(n >> 8),
        static_cast<std::uint8_t>(n >> 16), static_cast<std::uint8_t>(n >> 24)};
    stream.insert(stream.end(), prefix, prefix + kFramePrefixBytes);
    stream.insert(stream.end(), payload.begin(), payload.end());
}

const char* stream_end_name(StreamEnd end) noexcept {
    switch (end) {
        case StreamEnd::clean: return "clean";
        case StreamEnd::torn_prefix: return "torn_prefix";
        case StreamEnd::torn_payload: return "torn_payload";
        case StreamEnd::oversize: return "oversize";
    }
    return "unknown";
}

FrameCursor::FrameCursor(std::span<const std::uint8_t> stream, std::size_t max_payload) noexcept
    : stream_(stream), max_payload_(max_payload) {}

std::optional<Frame> FrameCursor::next() noexcept {
    if (stopped_) return std::nullopt;
    const std::size_t left = stream_.size() - offset_;
    if (left == 0) {
        stopped_ = true;
        return std::nullopt;
    }
    if (left < kFramePrefixBytes) {
        end_ = StreamEnd::torn_prefix;
        stopped_ = true;
        return std::nullopt;
    }
    declared_ = read_le32(stream_.data() + offset_);
    if (declared_ > max_payload_) {
        end_ = StreamEnd::oversize;
        stopped_ = true;
        return std::nullopt;
    }
    if (declared_ > left - kFramePrefixBytes) {
        end_ = StreamEnd::torn_payload;
        stopped_ = true;
        return std::nullopt;
    }
    Frame frame{offset_, stream_.subspan(offset_ + kFramePrefixBytes, declared_)};
    offset_ += kFramePrefixBytes + declared_;
    return frame;
}

std::string FrameCursor::end_detail() const {
    switch (end_) {
        case StreamEnd::clean: return fmt::format("clean end at byte {}", offset_);
        case StreamEnd::torn_prefix:
            return fmt::format("torn_prefix: {} stray bytes at offset {}, too few for a length",
                               bytes_left(), offset_);
        case StreamEnd::torn_payload:
            return fmt::format("torn_payload: frame at offset {} declares {} bytes, only {} remain",
                               offset_, declared_, bytes_left() - kFramePrefixBytes);
        case StreamEnd::oversize:
            return fmt::format("oversize: frame at offset {} declares {} bytes, limit {}", offset_,
                               declared_, max_payload_);
    }
    return "unknown";
}

bool looks_like_frame_stream(std::span<const std::uint8_t> bytes) noexcept {
    // prefix (4) + root offset (4) + identifier (4)
    if (bytes.size() < 12) return false;
    const std::uint32_t first = read_le32(bytes.data());
    return first >= 8 && first <= kMaxFeedMessageBytes &&
           std::memcmp(bytes.data() + 8, "LPF1", 4) == 0;
}

}  // namespace liveprob::protocol
