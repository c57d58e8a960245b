// Runs the built `liveprob check-feed` on real files: the JSON-lines fixture with known bad
// lines, a size-prefixed stream with a damaged frame and a torn tail, and bad usage.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <sstream>
#include <vector>

#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/framing.hpp"
#include "liveprob/protocol/json_feed.hpp"
#include "liveprob/protocol/whole_file.hpp"
#include "sample_messages.hpp"
#include "test_env.hpp"

using namespace liveprob;

using namespace liveprob::core;
using namespace liveprob::test;

namespace {

std::vector<std::string> lines_of(const std::string& text) {
    std::vector<std::string> out;
    std::istringstream in(text);
    for (std::string line; std::getline(in, line);) out.push_back(line);
    return out;
}

std::string quoted(const std::filesystem::path& p) { return fmt::format("'{}'", p.string()); }

// Standard error only (standard output goes nowhere).
CommandResult stderr_of(const std::string& args) {
    return run_command(quoted(liveprob_binary()) + " " + args + " 2>&1 >/dev/null");
}

CommandResult stdout_of(const std::string& args) {
    return run_command(quoted(liveprob_binary()) + " " + args + " 2>/dev/null");
}

const std::filesystem::path kFixture = source_dir() / "tests/data/check_feed_sample.jsonl";

}  // namespace

TEST_CASE("check-feed reports every bad line of the fixture, in order", "[check_feed]") {
    const auto errors = stderr_of("check-feed " + quoted(kFixture));
    CHECK(errors.exit_code == 1);
    const std::vector<std::string> expected{
        "line 5: field 'side': expected 'home' or 'away', got 'hme'",
        "line 6: field 'secnd_yellow': unknown field for a 'red_card' message",
        "line 9: field 'xg': must be in [0, 1], got 1.4",
        "line 10: not valid JSON",  // followed by the parser's reason
        "line 15: field 'clock': expected minutes:seconds like \"67:12\", got \"47:80\"",
        "line 17: field 'away_goals': required but missing",
    };
    const auto got = lines_of(errors.out);
    REQUIRE(got.size() == expected.size());
    for (std::size_t i = 0; i < expected.size(); ++i) {
        CHECK(got[i].rfind(expected[i], 0) == 0);
    }
}

TEST_CASE("check-feed summarises the fixture as JSON", "[check_feed]") {
    const auto summary = stdout_of("check-feed --json " + quoted(kFixture));
    CHECK(summary.exit_code == 1);
    CHECK(
        summary.out ==
        "{\"form\": \"json_lines\", \"units\": 18, \"ok\": 10, \"skipped\": 2, \"bad\": 6, "
        "\"kinds\": {\"final_whistle\": 1, \"goal\": 2, \"goal_cancelled\": 1, \"period_end\": 1, "
        "\"period_start\": 2, \"setup\": 1, \"shot_xg\": 1, \"stoppage\": 1}, "
        "\"repeated_seq\": 1, \"out_of_order_seq\": 0}\n");
    const auto text = stdout_of("check-feed " + quoted(kFixture));
    CHECK(text.out.find("18 lines: 10 ok, 2 skipped, 6 bad") != std::string::npos);
}

TEST_CASE("check-feed passes a clean feed with exit 0", "[check_feed]") {
    const auto dir = scratch_dir("check-feed-clean");
    std::string text;
    for (const auto& m : sample_messages()) text += protocol::to_json_line(m) + "\n";
    protocol::write_file_atomically(dir / "clean.jsonl", text);
    const auto run = stderr_of("check-feed " + quoted(dir / "clean.jsonl"));
    CHECK(run.exit_code == 0);
    CHECK(run.out.empty());
    std::filesystem::remove_all(dir);
}

TEST_CASE("check-feed reads a size-prefixed stream and reports a bad frame and a torn tail",
          "[check_feed]") {
    const auto dir = scratch_dir("check-feed-stream");
    std::vector<std::uint8_t> stream;
    const auto messages = sample_messages();
    std::size_t bad_offset = 0;
    for (std::size_t i = 0; i < 5; ++i) {
        auto bytes = protocol::encode_feed_message(messages[i]);
        if (i == 2) {
            bad_offset = stream.size();
            bytes[4] = 'X';  // wrong identifier
        }
        protocol::append_frame(stream, bytes);
    }
    const std::size_t tail_offset = stream.size();
    stream.insert(stream.end(), {0x40, 0x00, 0x00, 0x00, 0x01, 0x02});  // promises 64 bytes, has 2
    protocol::write_file_atomically(dir / "journal.lpf", stream);

    const auto errors = stderr_of("check-feed " + quoted(dir / "journal.lpf"));
    CHECK(errors.exit_code == 1);
    const auto got = lines_of(errors.out);
    REQUIRE(got.size() == 2);
    CHECK(got[0] ==
          fmt::format("frame 3 at offset {}: wrong_identifier: expected 'LPF1', got 'XPF1'",
                      bad_offset));
    CHECK(got[1] ==
          fmt::format(
              "after frame 5: torn_payload: frame at offset {} declares 64 bytes, only 2 remain",
              tail_offset));
    const auto summary = stdout_of("check-feed --json " + quoted(dir / "journal.lpf"));
    CHECK(summary.out.rfind(
              "{\"form\": \"frame_stream\", \"units\": 6, \"ok\": 4, \"skipped\": 0, \"bad\": 2,",
              0) == 0);
    std::filesystem::remove_all(dir);
}

TEST_CASE("check-feed: usage errors exit 2, an unreadable file exits 1", "[check_feed]") {
    const auto no_file = stderr_of("check-feed");
    CHECK(no_file.exit_code == 2);
    CHECK(lines_of(no_file.out).size() == 1);
    const auto missing =
        stderr_of("check-feed " + quoted(source_dir() / "tests/data/no-such-feed.jsonl"));
    CHECK(missing.exit_code == 1);
    CHECK(missing.out.find("cannot open") != std::string::npos);
    CHECK(lines_of(missing.out).size() == 1);
    CHECK(run_command(quoted(liveprob_binary()) + " check-feed --help >/dev/null").exit_code == 0);
}
