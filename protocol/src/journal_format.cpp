#include "liveprob/protocol/journal_format.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cstring>
#include <stdexcept>

#include "liveprob/protocol/crc32c.hpp"
#include "liveprob/protocol/framing.hpp"

namespace liveprob::protocol {

namespace {

std::uint32_t read_le32(const std::uint8_t* p) noexcept {
    return static_cast<std::uint32_t>(p[0]) | (static_cast<std::uint32_t>(p[1]) << 8) |
           (static_cast<std::uint32_t>(p[2]) << 16) | (static_cast<std::uint32_t>(p[3]) << 24);
}

void append_le32(std::vector<std::uint8_t>& out, std::uint32_t v) {
    const std::uint8_t b[4] = {static_cast<std::uint8_t>(v), static_cast<std::uint8_t>(v >> 8),
                               static_cast<std::uint8_t>(v >> 16),
                               static_cast<std::uint8_t>(v >> 24)};
    out.insert(out.end(), b, b + 4);
}

constexpr std::size_t kNotesKept = 20;
constexpr std::string_view kSegmentPrefix = "segment-";
constexpr std::string_view kSegmentSuffix = ".lpj";
constexpr std::size_t kSegmentDigits = 12;

}  // namespace

void append_journal_header(std::vector<std::uint8_t>& out) {
    out.insert(out.end(), kJournalMagic.begin(), kJournalMagic.end());
    append_le32(out, kJournalFormatVersion);
    append_le32(out, 0);
}

void append_journal_record(std::vector<std::uint8_t>& out, std::span<const std::uint8_t> payload) {
    if (payload.size() > kMaxJournalPayloadBytes) {
        throw std::length_error(fmt::format("journal record of {} bytes exceeds the limit of {}",
                                            payload.size(), kMaxJournalPayloadBytes));
    }
    out.insert(out.end(), kJournalRecordMarker.begin(), kJournalRecordMarker.end());
    const std::size_t length_at = out.size();
    append_le32(out, static_cast<std::uint32_t>(payload.size()));
    const std::uint32_t crc =
        crc32c(std::span<const std::uint8_t>(out.data() + length_at, 4), payload);
    append_le32(out, crc);
    out.insert(out.end(), payload.begin(), payload.end());
}

JournalFileKind classify_journal_file(std::span<const std::uint8_t> bytes) noexcept {
    if (bytes.empty()) return JournalFileKind::empty;
    if (bytes.size() >= kJournalHeaderBytes &&
        std::equal(kJournalMagic.begin(), kJournalMagic.end(), bytes.begin())) {
        return read_le32(bytes.data() + 8) == kJournalFormatVersion
                   ? JournalFileKind::segment
                   : JournalFileKind::newer_version;
    }
    if (looks_like_frame_stream(bytes)) return JournalFileKind::previous_format;
    return JournalFileKind::foreign;
}

std::string describe_journal_file_kind(JournalFileKind kind) {
    switch (kind) {
        case JournalFileKind::segment:
            return fmt::format("a journal segment (format {})", kJournalFormatVersion);
        case JournalFileKind::empty: return "an empty file";
        case JournalFileKind::newer_version:
            return fmt::format("a journal segment of a format other than {}",
                               kJournalFormatVersion);
        case JournalFileKind::previous_format:
            return "bare size-prefixed frames (journal format 1, no checksums)";
        case JournalFileKind::foreign: return "not a journal (no journal header)";
    }
    return "unknown";
}

JournalRecordReader::JournalRecordReader(std::span<const std::uint8_t> segment) noexcept
    : bytes_(segment), offset_(std::min(kJournalHeaderBytes, segment.size())) {}

JournalRecordReader::Check JournalRecordReader::check_at(std::size_t offset,
                                                         std::uint32_t& length) const noexcept {
    if (bytes_.size() - offset < kJournalRecordHeaderBytes) return Check::short_header;
    const std::uint8_t* p = bytes_.data() + offset;
    if (std::memcmp(p, kJournalRecordMarker.data(), kJournalRecordMarker.size()) != 0)
        return Check::no_marker;
    length = read_le32(p + 4);
    if (length > kMaxJournalPayloadBytes) return Check::too_long;
    if (bytes_.size() - offset - kJournalRecordHeaderBytes < length) return Check::past_end;
    const std::uint32_t crc = crc32c(std::span<const std::uint8_t>(p + 4, 4),
                                     std::span<const std::uint8_t>(p + 12, length));
    return crc == read_le32(p + 8) ? Check::ok : Check::checksum;
}

std::optional<std::size_t> JournalRecordReader::next_good_record(std::size_t from) const noexcept {
    while (from + kJournalRecordHeaderBytes <= bytes_.size()) {
        const void* hit = std::memchr(bytes_.data() + from, kJournalRecordMarker[0],
                                      bytes_.size() - kJournalRecordHeaderBytes + 1 - from);
        if (hit == nullptr) return std::nullopt;
        const auto at =
            static_cast<std::size_t>(static_cast<const std::uint8_t*>(hit) - bytes_.data());
        std::uint32_t length = 0;
        if (check_at(at, length) == Check::ok) return at;
        from = at + 1;
    }
    return std::nullopt;
}

JournalTail JournalRecordReader::classify_tail(std::size_t offset) const noexcept {
    const auto rest = bytes_.subspan(offset);
    if (std::all_of(rest.begin(), rest.end(), [](std::uint8_t b) { return b == 0; }))
        return JournalTail::torn;  // zero fill: blocks allocated, never written
    const std::size_t marker_bytes = std::min(rest.size(), kJournalRecordMarker.size());
    if (std::memcmp(rest.data(), kJournalRecordMarker.data(), marker_bytes) != 0)
        return JournalTail::damaged;
    if (rest.size() < kJournalRecordHeaderBytes) return JournalTail::torn;
    const std::uint32_t length = read_le32(rest.data() + 4);
    // A record the file ends inside of: a write cut short.
    return length <= kMaxJournalPayloadBytes && rest.size() < kJournalRecordHeaderBytes + length
               ? JournalTail::torn
               : JournalTail::damaged;
}

std::optional<JournalRecord> JournalRecordReader::next() noexcept {
    static constexpr const char* kWhy[] = {"",
                                           "too short for a record",
                                           "no record marker",
                                           "length beyond the limit",
                                           "length past the end",
                                           "checksum mismatch"};
    while (!done_) {
        if (offset_ >= bytes_.size()) {
            done_ = true;
            tail_offset_ = bytes_.size();
            break;
        }
        std::uint32_t length = 0;
        const Check check = check_at(offset_, length);
        if (check == Check::ok) {
            JournalRecord record{offset_,
                                 bytes_.subspan(offset_ + kJournalRecordHeaderBytes, length)};
            offset_ += kJournalRecordHeaderBytes + length;
            return record;
        }
        if (const auto good = next_good_record(offset_ + 1)) {
            ++damaged_regions_;
            damaged_bytes_ += *good - offset_;
            if (notes_.size() < kNotesKept) {
                notes_.push_back(fmt::format("bytes {}-{} skipped ({})", offset_, *good - 1,
                                             kWhy[static_cast<int>(check)]));
            }
            offset_ = *good;
            continue;
        }
        done_ = true;
        tail_offset_ = offset_;
        tail_ = classify_tail(offset_);
        if (tail_ == JournalTail::damaged && notes_.size() < kNotesKept) {
            notes_.push_back(fmt::format("bytes {}-{} at the end are no record ({}); kept", offset_,
                                         bytes_.size() - 1, kWhy[static_cast<int>(check)]));
        }
    }
    return std::nullopt;
}

std::string journal_segment_name(std::uint64_t number) {
    return fmt::format("{}{:0{}}{}", kSegmentPrefix, number, kSegmentDigits, kSegmentSuffix);
}

std::optional<std::uint64_t> journal_segment_number(const std::string& name) {
    if (name.size() != kSegmentPrefix.size() + kSegmentDigits + kSegmentSuffix.size() ||
        name.compare(0, kSegmentPrefix.size(), kSegmentPrefix) != 0 ||
        name.compare(name.size() - kSegmentSuffix.size(), kSegmentSuffix.size(), kSegmentSuffix) !=
            0) {
        return std::nullopt;
    }
    std::uint64_t number = 0;
    for (std::size_t i = kSegmentPrefix.size(); i < kSegmentPrefix.size() + kSegmentDigits; ++i) {
        if (name[i] < '0' || name[i] > '9') return std::nullopt;
        number = number * 10 + static_cast<std::uint64_t>(name[i] - '0');
    }
    return number;
}

std::vector<std::filesystem::path> list_journal_segments(const std::filesystem::path& folder) {
    std::vector<std::pair<std::uint64_t, std::filesystem::path>> found;
    for (const auto& entry : std::filesystem::directory_iterator(folder)) {
        if (const auto number = journal_segment_number(entry.path().filename().string()))
            found.emplace_back(*number, entry.path());
    }
    std::sort(found.begin(), found.end());
    std::vector<std::filesystem::path> out;
    out.reserve(found.size());
    for (auto& [number, path] : found) out.push_back(std::move(path));
    return out;
}

}  // namespace liveprob::protocol
