// Size-prefixed stream framing, the format of the journal and of recorded streams: each frame
// is a 4-byte little-endian length followed by that many bytes (one FeedMessage buffer),
// repeated to the end of the file. Pure byte work; see whole_file.hpp for files.
#pragma once

#include <cstddef>
#include <cstdint>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "liveprob/protocol/feed_codec.hpp"

namespace liveprob::protocol {

inline constexpr std::size_t kFramePrefixBytes = 4;

// Appends one frame. Throws std::length_error when `payload` exceeds `max_payload`, so a
// writer can never produce a frame its readers would refuse.
void append_frame(std::vector<std::uint8_t>& stream, std::span<const std::uint8_t> payload,
                  std::size_t max_payload = kMaxFeedMessageBytes);

struct Frame {
    std::size_t offset = 0;  // of the length prefix within the stream
    std::span<const std::uint8_t> payload;
};

// How the stream ended.
enum class StreamEnd : std::uint8_t {
    clean,         // the last frame ended exactly at the end
    torn_prefix,   // 1-3 bytes left, too few for a length prefix
    torn_payload,  // a prefix promises more bytes than remain
    oversize,      // a prefix declares a frame larger than the limit (reading stops there)
};
const char* stream_end_name(StreamEnd end) noexcept;

// Walks the frames of a stream. next() returns frames until the end or the first damaged
// frame; then end() says which, and end_detail() says where, in one line.
class FrameCursor {
public:
    explicit FrameCursor(std::span<const std::uint8_t> stream,
                         std::size_t max_payload = kMaxFeedMessageBytes) noexcept;

    std::optional<Frame> next() noexcept;

    StreamEnd end() const noexcept { return end_; }
    std::size_t end_offset() const noexcept { return offset_; }  // where the damage begins
    std::uint32_t declared_length() const noexcept { return declared_; }
    std::size_t bytes_left() const noexcept { return stream_.size() - offset_; }
    std::string end_detail() const;

private:
    std::span<const std::uint8_t> stream_;
    std::size_t max_payload_;
    std::size_t offset_ = 0;
    std::uint32_t declared_ = 0;
    StreamEnd end_ = StreamEnd::clean;
    bool stopped_ = false;
};

// True when `bytes` begins like a size-prefixed FeedMessage stream (a plausible length and the
// feed file identifier where the first buffer keeps it). Used to tell binary from JSON lines.
bool looks_like_frame_stream(std::span<const std::uint8_t> bytes) noexcept;

}  // namespace liveprob::protocol
