// The journal on real files: checksummed records in rotating segments, recovery that skips a
// damaged record and keeps everything after it, a torn tail cut, foreign files refused and left
// byte for byte as they were, the folder lock, and compaction.
#include <catch2/catch.hpp>

#include <fcntl.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include "liveprob/files/journal.hpp"
#include "liveprob/protocol/crc32c.hpp"
#include "liveprob/protocol/journal_format.hpp"
#include "liveprob/protocol/whole_file.hpp"
#include "test_env.hpp"

using namespace liveprob::files;
namespace lp = liveprob::protocol;
namespace fs = std::filesystem;
using Bytes = std::vector<std::uint8_t>;

namespace {

// Payloads of varied sizes whose bytes say which they are.
std::vector<Bytes> numbered_payloads(int count) {
    std::vector<Bytes> out;
    for (int i = 0; i < count; ++i) {
        Bytes p(static_cast<std::size_t>(20 + (i * 37) % 300), static_cast<std::uint8_t>(i));
        p[0] = static_cast<std::uint8_t>(i >> 8);
        out.push_back(std::move(p));
    }
    return out;
}

// Opens the journal (creating it, or after what it holds), replays it and appends `payloads`.
void write_journal(const fs::path& folder, const std::vector<Bytes>& payloads,
                   std::uint64_t segment_bytes = kDefaultJournalSegmentBytes) {
    Journal journal(folder, JournalSync::none, std::chrono::milliseconds(10), segment_bytes);
    journal.replay([](std::span<const std::uint8_t>) {});
    for (const auto& p : payloads) journal.append(p);
}

struct Replayed {
    std::vector<Bytes> records;
    JournalReplayReport report;
};

Replayed replay_folder(const fs::path& folder) {
    Replayed out;
    Journal journal(folder, JournalSync::none, std::chrono::milliseconds(10));
    out.report = journal.replay(
        [&](std::span<const std::uint8_t> r) { out.records.emplace_back(r.begin(), r.end()); });
    return out;
}

fs::path only_segment(const fs::path& folder) {
    const auto segments = lp::list_journal_segments(folder);
    REQUIRE(segments.size() == 1);
    return segments.front();
}

// Offsets of every record in a clean segment, from the format's own reader.
std::vector<std::size_t> record_offsets(const fs::path& segment) {
    const auto bytes = lp::read_whole_file_bytes(segment);
    lp::JournalRecordReader reader(bytes);
    std::vector<std::size_t> out;
    while (const auto r = reader.next()) out.push_back(r->offset);
    return out;
}

void overwrite(const fs::path& file, std::size_t offset, const Bytes& bytes) {
    auto content = lp::read_whole_file_bytes(file);
    REQUIRE(offset + bytes.size() <= content.size());
    std::copy(bytes.begin(), bytes.end(), content.begin() + static_cast<std::ptrdiff_t>(offset));
    lp::write_file_atomically(file, content);
}

std::vector<Bytes> without(std::vector<Bytes> v, std::size_t index) {
    v.erase(v.begin() + static_cast<std::ptrdiff_t>(index));
    return v;
}

std::string error_opening(const fs::path& path) {
    try {
        Journal journal(path, JournalSync::none, std::chrono::milliseconds(10));
    } catch (const JournalError& e) {
        return e.what();
    }
    return "";
}

}  // namespace

TEST_CASE("CRC-32C matches the published check values", "[unit][journal]") {
    const std::string check = "123456789";
    // The CRC catalogue's check value for CRC-32C (CRC-32/ISCSI): 0xE3069283.
    CHECK(lp::crc32c({reinterpret_cast<const std::uint8_t*>(check.data()), check.size()}) ==
          0xE3069283u);
    // RFC 3720 (iSCSI), appendix B.4, CRC examples over 32 bytes.
    CHECK(lp::crc32c(Bytes(32, 0x00)) == 0x8A9136AAu);
    CHECK(lp::crc32c(Bytes(32, 0xFF)) == 0x62A8AB43u);
    Bytes up(32), down(32);
    for (int i = 0; i < 32; ++i) {
        up[static_cast<std::size_t>(i)] = static_cast<std::uint8_t>(i);
        down[static_cast<std::size_t>(i)] = static_cast<std::uint8_t>(31 - i);
    }
    CHECK(lp::crc32c(up) == 0x46DD794Eu);
    CHECK(lp::crc32c(down) == 0x113FDB5Cu);
    // In two pieces, the same.
    CHECK(lp::crc32c(std::span(up).first(10), std::span(up).subspan(10)) == 0x46DD794Eu);
}

TEST_CASE("journal: records replay in order across rotated segments", "[unit][journal]") {
    const auto dir = liveprob::test::scratch_dir("journal-rotate") / "j";
    const auto payloads = numbered_payloads(200);
    write_journal(dir, payloads, 4096);
    const auto segments = lp::list_journal_segments(dir);
    CHECK(segments.size() > 5);
    for (const auto& s : segments) CHECK(fs::file_size(s) <= 4096);
    const auto replayed = replay_folder(dir);
    CHECK(replayed.records == payloads);
    CHECK(replayed.report.segments == segments.size());
    CHECK(replayed.report.damaged_records == 0);
    CHECK(replayed.report.torn_bytes == 0);

    // Reopened, it appends after the last record (to the last segment while it has room).
    write_journal(dir, {Bytes{9, 9, 9}}, 4096);  // appended after a reopen
    auto expected = payloads;
    expected.push_back(Bytes{9, 9, 9});
    CHECK(replay_folder(dir).records == expected);
}

TEST_CASE("journal: a damaged length mid-file loses that record only", "[unit][journal]") {
    const auto dir = liveprob::test::scratch_dir("journal-length") / "j";
    const auto payloads = numbered_payloads(50);
    write_journal(dir, payloads);
    const auto segment = only_segment(dir);
    const auto offsets = record_offsets(segment);
    // Record 20's length field says 70,000 bytes (beyond the limit, past the end).
    overwrite(segment, offsets[20] + 4, Bytes{0x70, 0x11, 0x01, 0x00});
    const auto size_before = fs::file_size(segment);
    const auto replayed = replay_folder(dir);
    CHECK(replayed.records == without(payloads, 20));
    CHECK(replayed.report.damaged_records == 1);
    CHECK(replayed.report.damaged_bytes == offsets[21] - offsets[20]);
    CHECK(replayed.report.torn_bytes == 0);
    CHECK(fs::file_size(segment) == size_before);  // nothing cut

    // A length that stays in range but is wrong (the checksum covers it).
    overwrite(segment, offsets[30] + 4, Bytes{0x05, 0x00, 0x00, 0x00});
    auto expected = without(without(payloads, 30), 20);
    CHECK(replay_folder(dir).records == expected);
}

TEST_CASE("journal: a bit-flipped record is skipped, the rest kept", "[unit][journal]") {
    const auto dir = liveprob::test::scratch_dir("journal-flip") / "j";
    const auto payloads = numbered_payloads(40);
    write_journal(dir, payloads);
    const auto segment = only_segment(dir);
    const auto offsets = record_offsets(segment);
    auto bytes = lp::read_whole_file_bytes(segment);
    bytes[offsets[7] + lp::kJournalRecordHeaderBytes + 5] ^= 0x10;      // in record 7's payload
    bytes[offsets.back() + lp::kJournalRecordHeaderBytes + 1] ^= 0x01;  // and the last record's
    lp::write_file_atomically(segment, bytes);
    const auto replayed = replay_folder(dir);
    CHECK(replayed.records == without(without(payloads, payloads.size() - 1), 7));
    CHECK(replayed.report.damaged_records == 2);
    // A damaged last record is not a torn one: it stays on disk.
    CHECK(replayed.report.torn_bytes == 0);
    CHECK(lp::read_whole_file_bytes(segment) == bytes);

    // Appending after it: the reader steps over the damage to the new record.
    write_journal(dir, {Bytes{1, 2, 3}});  // appended after a reopen
    auto expected = without(without(payloads, payloads.size() - 1), 7);
    expected.push_back(Bytes{1, 2, 3});
    CHECK(replay_folder(dir).records == expected);
}

TEST_CASE("journal: a zero-filled or torn tail is cut, every record kept", "[unit][journal]") {
    const auto dir = liveprob::test::scratch_dir("journal-tails") / "j";
    const auto payloads = numbered_payloads(30);
    write_journal(dir, payloads);
    const auto segment = only_segment(dir);
    const auto clean_size = fs::file_size(segment);

    SECTION("zero fill, as blocks allocated and never written leave it") {
        fs::resize_file(segment, clean_size + 8192);
        const auto replayed = replay_folder(dir);
        CHECK(replayed.records == payloads);
        CHECK(replayed.report.torn_bytes == 8192);
        CHECK(fs::file_size(segment) == clean_size);
    }
    SECTION("a record cut short by a crash") {
        Bytes torn;
        lp::append_journal_record(torn, Bytes(100, 0x42));
        torn.resize(60);
        {
            std::ofstream out(segment, std::ios::binary | std::ios::app);
            out.write(reinterpret_cast<const char*>(torn.data()),
                      static_cast<std::streamsize>(torn.size()));
        }
        const auto replayed = replay_folder(dir);
        CHECK(replayed.records == payloads);
        CHECK(replayed.report.torn_bytes == 60);
        CHECK(replayed.report.damaged_records == 0);
        CHECK(fs::file_size(segment) == clean_size);
    }
    SECTION("a few bytes of a record header") {
        {
            std::ofstream out(segment, std::ios::binary | std::ios::app);
            out.write("\xF5\x4A\x52", 3);
        }
        CHECK(replay_folder(dir).report.torn_bytes == 3);
        CHECK(fs::file_size(segment) == clean_size);
    }
    // Appending after the cut continues a clean journal.
    write_journal(dir, {Bytes{5, 5}});  // appended after a reopen
    auto expected = payloads;
    expected.push_back(Bytes{5, 5});
    const auto again = replay_folder(dir);
    CHECK(again.records == expected);
    CHECK(again.report.torn_bytes == 0);
    CHECK(again.report.damaged_records == 0);
}

TEST_CASE("journal: a file that is not a journal folder is refused and left untouched",
          "[unit][journal]") {
    const auto dir = liveprob::test::scratch_dir("journal-foreign");
    const std::string feed =
        "{\"kind\":\"setup\",\"match\":1,\"seq\":1}\n{\"kind\":\"goal\",\"match\":1,\"seq\":2}\n";
    lp::write_file_atomically(dir / "feed.jsonl", feed);
    const auto error = error_opening(dir / "feed.jsonl");
    CHECK(error.find("not a journal folder") != std::string::npos);
    CHECK(error.find("left untouched") != std::string::npos);
    CHECK(lp::read_whole_file(dir / "feed.jsonl") == feed);

    // A journal of the previous format (bare frames): the message names the conversion.
    Bytes old_format = {16, 0, 0, 0, 12, 0, 0, 0, 'L', 'P', 'F', '1', 0, 0, 0, 0, 0, 0, 0, 0};
    lp::write_file_atomically(dir / "old.lpf", old_format);
    const auto old_error = error_opening(dir / "old.lpf");
    CHECK(old_error.find("previous format") != std::string::npos);
    CHECK(old_error.find("liveprob convert") != std::string::npos);
    CHECK(lp::read_whole_file_bytes(dir / "old.lpf") == old_format);

    // A folder with a segment that has no journal header: refused before anything is read.
    write_journal(dir / "j", numbered_payloads(5));
    const auto stray = dir / "j" / lp::journal_segment_name(7);
    lp::write_file_atomically(stray, feed);
    const auto first = lp::read_whole_file_bytes(dir / "j" / lp::journal_segment_name(1));
    const auto segment_error = error_opening(dir / "j");
    CHECK(segment_error.find(lp::journal_segment_name(7)) != std::string::npos);
    CHECK(segment_error.find("not a journal") != std::string::npos);
    CHECK(lp::read_whole_file(stray) == feed);
    CHECK(lp::read_whole_file_bytes(dir / "j" / lp::journal_segment_name(1)) == first);
}

TEST_CASE("journal: one process at a time holds a journal folder", "[unit][journal]") {
    const auto dir = liveprob::test::scratch_dir("journal-lock") / "j";
    {
        Journal first(dir, JournalSync::none, std::chrono::milliseconds(10));
        const auto error = error_opening(dir);
        CHECK(error.find("in use by another process") != std::string::npos);
        CHECK(error.find(std::to_string(::getpid())) != std::string::npos);
    }
    CHECK(error_opening(dir).empty());  // released with the first
}

TEST_CASE("journal: compaction keeps exactly the records asked for, in order", "[unit][journal]") {
    const auto dir = liveprob::test::scratch_dir("journal-compact") / "j";
    const auto payloads = numbered_payloads(300);
    // Keep the records whose last byte is a multiple of 3 and those from 250 on (a match still
    // live); the first 60 are dropped whole, so their segments go.
    auto wanted = [](std::span<const std::uint8_t> r) {
        const int i = (r[0] << 8) | r.back();
        return i >= 250 || (i >= 60 && i % 3 == 0);
    };
    std::vector<Bytes> expected;
    for (const auto& p : payloads)
        if (wanted(p)) expected.push_back(p);
    Journal journal(dir, JournalSync::none, std::chrono::milliseconds(10), 4096);
    journal.replay([](std::span<const std::uint8_t>) {});
    for (const auto& p : payloads) journal.append(p);
    const auto before = lp::list_journal_segments(dir).size();
    const auto report = journal.compact(wanted);
    CHECK(report.records_kept == expected.size());
    CHECK(report.records_dropped == payloads.size() - expected.size());
    CHECK(report.segments_removed >= 2);
    CHECK(report.segments_rewritten >= 1);
    CHECK(report.bytes_after < report.bytes_before);
    CHECK(lp::list_journal_segments(dir).size() == before - report.segments_removed);
    // Appends go on after compaction, into a new segment after the kept ones.
    journal.append(Bytes{7, 7});
    expected.push_back(Bytes{7, 7});
    std::vector<Bytes> seen;
    for (const auto& segment : lp::list_journal_segments(dir)) {
        const auto bytes = lp::read_whole_file_bytes(segment);
        lp::JournalRecordReader reader(bytes);
        while (const auto r = reader.next())
            seen.emplace_back(r->payload.begin(), r->payload.end());
        CHECK(reader.tail() == lp::JournalTail::clean);
    }
    CHECK(seen == expected);
}

TEST_CASE("journal: a segment with damage is left as it is by compaction", "[unit][journal]") {
    const auto dir = liveprob::test::scratch_dir("journal-compact-damage") / "j";
    write_journal(dir, numbered_payloads(20));
    const auto segment = only_segment(dir);
    const auto offsets = record_offsets(segment);
    overwrite(segment, offsets[3] + 13, Bytes{0xEE});
    const auto damaged = lp::read_whole_file_bytes(segment);
    Journal journal(dir, JournalSync::none, std::chrono::milliseconds(10));
    journal.replay([](std::span<const std::uint8_t>) {});
    const auto report = journal.compact([](std::span<const std::uint8_t>) { return false; });
    CHECK(report.segments_kept == 1);
    CHECK(report.records_dropped == 0);
    CHECK(lp::read_whole_file_bytes(segment) == damaged);
}

TEST_CASE("journal: a device path takes the records alone", "[unit][journal]") {
    Journal journal("/dev/null", JournalSync::every_message, std::chrono::milliseconds(10));
    CHECK(journal.replay([](std::span<const std::uint8_t>) {}).frames == 0);
    journal.append(Bytes{1, 2, 3});
    CHECK(journal.frames_written() == 1);
    Journal full("/dev/full", JournalSync::none, std::chrono::milliseconds(10));
    CHECK_THROWS_AS(full.append(Bytes{1}), JournalError);
}
