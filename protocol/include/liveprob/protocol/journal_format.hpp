// The journal's on-disk format, pure byte work (the files that hold it are written by
// adapters/files/journal.hpp; the replay tool, check-feed and convert read it through here).
//
// A journal is a folder of segment files, `segment-<12 digits>.lpj`, read in number order. Each
// segment starts with a 16-byte header, then records back to back:
//
//   header: magic "\x89LPJRNL\n" (8) | format version, u32 LE (4) | zero (4)
//   record: marker F5 4A 52 0C (4) | payload length, u32 LE (4) | CRC-32C of the length's 4
//           bytes and the payload, u32 LE (4) | payload: one FeedMessage buffer (length bytes)
//
// The checksum covers the length, so a damaged length is caught like a damaged payload; the
// marker lets a reader find the next record after a damaged one. Format version 1 was the bare
// size-prefixed frames of framing.hpp (no header, no checksums).
#pragma once

#include <array>
#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "liveprob/protocol/feed_codec.hpp"

namespace liveprob::protocol {

inline constexpr std::array<std::uint8_t, 8> kJournalMagic = {0x89, 'L', 'P', 'J',
                                                              'R',  'N', 'L', '\n'};
inline constexpr std::uint32_t kJournalFormatVersion = 2;
inline constexpr std::size_t kJournalHeaderBytes = 16;
inline constexpr std::array<std::uint8_t, 4> kJournalRecordMarker = {0xF5, 0x4A, 0x52, 0x0C};
inline constexpr std::size_t kJournalRecordHeaderBytes = 12;
inline constexpr std::size_t kMaxJournalPayloadBytes = kMaxFeedMessageBytes;

void append_journal_header(std::vector<std::uint8_t>& out);
// Appends one record; throws std::length_error beyond kMaxJournalPayloadBytes.
void append_journal_record(std::vector<std::uint8_t>& out, std::span<const std::uint8_t> payload);

// What the first bytes of a file say it is.
enum class JournalFileKind : std::uint8_t {
    segment,          // the header of this format version
    empty,            // no bytes at all
    newer_version,    // our magic, a version this build does not know
    previous_format,  // bare size-prefixed frames (format version 1)
    foreign,          // anything else (a JSON-lines feed, a stray file, a damaged header)
};
JournalFileKind classify_journal_file(std::span<const std::uint8_t> bytes) noexcept;
// One line for an error message: "bare size-prefixed frames (journal format 1)" and so on.
std::string describe_journal_file_kind(JournalFileKind kind);

struct JournalRecord {
    std::size_t offset = 0;  // of the record's marker within the segment
    std::span<const std::uint8_t> payload;
};

// How a segment's bytes ended after the last whole record.
enum class JournalTail : std::uint8_t {
    clean,    // the last record ends exactly at the end
    torn,     // an incomplete last record or zero fill: what a crash mid-write leaves; cuttable
    damaged,  // bytes that are no record and no torn one; kept, counted
};

// Walks the records of one segment (header included in `segment`). A record whose marker,
// length or checksum is wrong is skipped: the reader looks for the next whole record with a good
// checksum and goes on from there, counting what it skipped. Nothing after damage is lost.
class JournalRecordReader {
public:
    explicit JournalRecordReader(std::span<const std::uint8_t> segment) noexcept;

    std::optional<JournalRecord> next() noexcept;

    // Valid once next() returned nothing.
    JournalTail tail() const noexcept { return tail_; }
    std::size_t tail_offset() const noexcept { return tail_offset_; }  // where the tail starts
    std::uint64_t damaged_regions() const noexcept { return damaged_regions_; }
    std::uint64_t damaged_bytes() const noexcept { return damaged_bytes_; }  // tail not included
    // One line per damaged region, e.g. "bytes 120-167 skipped (checksum mismatch)"; the first
    // few only, enough for a log.
    const std::vector<std::string>& damage_notes() const noexcept { return notes_; }

private:
    enum class Check : std::uint8_t { ok, short_header, no_marker, too_long, past_end, checksum };
    Check check_at(std::size_t offset, std::uint32_t& length) const noexcept;
    std::optional<std::size_t> next_good_record(std::size_t from) const noexcept;
    JournalTail classify_tail(std::size_t offset) const noexcept;

    std::span<const std::uint8_t> bytes_;
    std::size_t offset_ = kJournalHeaderBytes;
    JournalTail tail_ = JournalTail::clean;
    std::size_t tail_offset_ = 0;
    std::uint64_t damaged_regions_ = 0;
    std::uint64_t damaged_bytes_ = 0;
    std::vector<std::string> notes_;
    bool done_ = false;
};

// The journal folder's segments: `segment-000000000001.lpj` and so on.
std::string journal_segment_name(std::uint64_t number);
// The number in a segment's file name, or nothing when the name is not a segment's.
std::optional<std::uint64_t> journal_segment_number(const std::string& file_name);
// The segments of a journal folder, in number order (other files are ignored).
std::vector<std::filesystem::path> list_journal_segments(const std::filesystem::path& folder);

}  // namespace liveprob::protocol
