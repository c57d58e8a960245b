// The final-states file of a journal folder (adapters/files/final_state_file.hpp) on real files:
// what is appended reads back by match id after reopening, a later record of a match wins, a
// damaged record costs only its own match, a torn tail is cut, and a foreign file is refused and
// left as it was.
#include <catch2/catch.hpp>

#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include "liveprob/files/final_state_file.hpp"
#include "liveprob/protocol/whole_file.hpp"
#include "test_env.hpp"

using namespace liveprob::files;
namespace fs = std::filesystem;
using Bytes = std::vector<std::uint8_t>;

namespace {
Bytes update_for(std::uint64_t id, std::size_t size) {
    Bytes b(size, static_cast<std::uint8_t>(id));
    b[0] = 0xAB;
    return b;
}
}  // namespace

TEST_CASE(
    "final states: read back by match id after reopening, the latest record of a match winning",
    "[unit][journal]") {
    const auto dir = liveprob::test::scratch_dir("final-states-read");
    {
        FinalStateFile file(dir, JournalSync::interval);
        file.append(7, update_for(7, 300));
        file.append(8, update_for(8, 40));
        file.append(7, update_for(9, 120));  // a second final state of match 7
        file.sync();
        CHECK_FALSE(file.awaiting_sync());
        CHECK(file.matches() == 2);
        CHECK(file.read(8) == update_for(8, 40));
    }
    FinalStateFile file(dir, JournalSync::interval);
    CHECK(file.matches() == 2);
    CHECK(file.holds(7));
    CHECK_FALSE(file.holds(9));
    CHECK(file.read(7) == update_for(9, 120));
    CHECK(file.read(8) == update_for(8, 40));
    CHECK_FALSE(file.read(9).has_value());
    CHECK(file.damaged_records() == 0);
}

TEST_CASE("final states: a damaged record costs its own match only and a torn tail is cut",
          "[unit][journal]") {
    const auto dir = liveprob::test::scratch_dir("final-states-damage");
    const fs::path path = dir / FinalStateFile::kFileName;
    std::uint64_t whole_size = 0;
    {
        FinalStateFile file(dir, JournalSync::none);
        file.append(1, update_for(1, 100));
        file.append(2, update_for(2, 100));
        file.append(3, update_for(3, 100));
        whole_size = file.file_bytes();
    }
    {
        // Flip a byte inside the second record's payload, and append half a record.
        std::fstream f(path, std::ios::in | std::ios::out | std::ios::binary);
        f.seekp(16 + (12 + 108) + 12 + 50);
        f.put('\x5A');
        f.seekp(0, std::ios::end);
        const char partial[] = {'\xF5', '\x4A', '\x52', '\x0C', 100, 0, 0, 0, 1, 2};
        f.write(partial, sizeof partial);
    }
    FinalStateFile file(dir, JournalSync::none);
    CHECK(file.holds(1));
    CHECK_FALSE(file.holds(2));
    CHECK(file.holds(3));
    CHECK(file.read(3) == update_for(3, 100));
    CHECK(file.damaged_records() == 1);
    CHECK(file.torn_bytes() == 10);
    CHECK(fs::file_size(path) == whole_size);
    file.append(4, update_for(4, 10));  // appends go on after the cut
    CHECK(file.read(4) == update_for(4, 10));
}

TEST_CASE("final states: a file of another format is refused and left untouched",
          "[unit][journal]") {
    const auto dir = liveprob::test::scratch_dir("final-states-foreign");
    const fs::path path = dir / FinalStateFile::kFileName;
    const std::string text = "{\"match\":1,\"seq\":1}\n";
    { std::ofstream(path) << text; }
    try {
        FinalStateFile file(dir, JournalSync::none);
        FAIL("a foreign file was opened");
    } catch (const JournalError& e) {
        CHECK(std::string(e.what()).find("left untouched") != std::string::npos);
    }
    CHECK(liveprob::protocol::read_whole_file(path) == text);
}
