// Size-prefixed framing: frames come back in order, and every way a stream can be cut or
// damaged is reported with its offset.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include "liveprob/protocol/framing.hpp"
#include "liveprob/protocol/whole_file.hpp"
#include "sample_messages.hpp"
#include "test_env.hpp"

using namespace liveprob;

using namespace liveprob::core;
using namespace liveprob::protocol;

namespace {

std::vector<std::uint8_t> sample_stream(std::vector<std::size_t>* frame_ends = nullptr) {
    std::vector<std::uint8_t> stream;
    for (const auto& m : test::sample_messages()) {
        append_frame(stream, encode_feed_message(m));
        if (frame_ends) frame_ends->push_back(stream.size());
    }
    return stream;
}

}  // namespace

TEST_CASE("frames come back in order and decode to what was written", "[framing]") {
    const auto stream = sample_stream();
    const auto messages = test::sample_messages();
    FrameCursor cursor(stream);
    std::size_t i = 0;
    while (auto frame = cursor.next()) {
        REQUIRE(i < messages.size());
        const auto decoded = decode_feed_message(frame->payload);
        REQUIRE(decoded.error == DecodeError::none);
        CHECK(*decoded.message == messages[i]);
        ++i;
    }
    CHECK(i == messages.size());
    CHECK(cursor.end() == StreamEnd::clean);
    CHECK(cursor.end_offset() == stream.size());
}

TEST_CASE("the length prefix is little-endian", "[framing]") {
    std::vector<std::uint8_t> stream;
    const std::vector<std::uint8_t> payload(0x0102, 0xAB);
    append_frame(stream, payload);
    REQUIRE(stream.size() == 4 + 0x0102);
    CHECK(stream[0] == 0x02);
    CHECK(stream[1] == 0x01);
    CHECK(stream[2] == 0x00);
    CHECK(stream[3] == 0x00);
}

TEST_CASE("a torn tail is reported precisely", "[framing]") {
    std::vector<std::size_t> ends;
    const auto stream = sample_stream(&ends);
    const std::size_t second_end = ends.at(1);

    SECTION("stray bytes too few for a prefix") {
        std::vector<std::uint8_t> cut(stream.begin(),
                                      stream.begin() + static_cast<std::ptrdiff_t>(second_end + 3));
        FrameCursor cursor(cut);
        int frames = 0;
        while (cursor.next()) ++frames;
        CHECK(frames == 2);
        CHECK(cursor.end() == StreamEnd::torn_prefix);
        CHECK(cursor.end_offset() == second_end);
        CHECK(cursor.end_detail() ==
              fmt::format("torn_prefix: 3 stray bytes at offset {}, too few for a length",
                          second_end));
    }
    SECTION("a frame cut short") {
        std::vector<std::uint8_t> cut(
            stream.begin(), stream.begin() + static_cast<std::ptrdiff_t>(second_end + 10));
        FrameCursor cursor(cut);
        int frames = 0;
        while (cursor.next()) ++frames;
        CHECK(frames == 2);
        CHECK(cursor.end() == StreamEnd::torn_payload);
        CHECK(cursor.bytes_left() == 10);
        CHECK(cursor.end_detail().find("only 6 remain") != std::string::npos);
    }
    SECTION("a length beyond the limit stops reading") {
        std::vector<std::uint8_t> bad = stream;
        bad[second_end + 3] = 0x7F;  // the third frame now declares about 2 GB
        FrameCursor cursor(bad);
        int frames = 0;
        while (cursor.next()) ++frames;
        CHECK(frames == 2);
        CHECK(cursor.end() == StreamEnd::oversize);
        CHECK(cursor.end_offset() == second_end);
        CHECK(cursor.next() == std::nullopt);  // stays stopped
    }
}

TEST_CASE("every cut of a stream keeps exactly the frames before the cut", "[framing]") {
    std::vector<std::size_t> ends;
    const auto stream = sample_stream(&ends);
    for (std::size_t size = 0; size <= stream.size(); ++size) {
        FrameCursor cursor(std::span<const std::uint8_t>(stream).first(size));
        std::size_t frames = 0;
        while (cursor.next()) ++frames;
        std::size_t complete = 0;
        while (complete < ends.size() && ends[complete] <= size) ++complete;
        REQUIRE(frames == complete);
        const std::size_t start = complete == 0 ? 0 : ends[complete - 1];
        const std::size_t left = size - start;
        const StreamEnd expected = left == 0  ? StreamEnd::clean
                                   : left < 4 ? StreamEnd::torn_prefix
                                              : StreamEnd::torn_payload;
        REQUIRE(cursor.end() == expected);
    }
}

TEST_CASE("empty streams, empty frames and refused writes", "[framing]") {
    FrameCursor empty(std::span<const std::uint8_t>{});
    CHECK_FALSE(empty.next().has_value());
    CHECK(empty.end() == StreamEnd::clean);

    std::vector<std::uint8_t> stream;
    append_frame(stream, std::span<const std::uint8_t>{});
    FrameCursor zero(stream);
    const auto frame = zero.next();
    REQUIRE(frame.has_value());
    CHECK(frame->payload.empty());
    CHECK(decode_feed_message(frame->payload).error == DecodeError::too_small);

    const std::vector<std::uint8_t> huge(kMaxFeedMessageBytes + 1);
    CHECK_THROWS_AS(append_frame(stream, huge), std::length_error);
    CHECK(stream.size() == 4);  // nothing half-written
}

TEST_CASE("a stream survives a real file and is told apart from text", "[framing]") {
    const auto dir = test::scratch_dir("framing");
    const auto stream = sample_stream();
    write_file_atomically(dir / "feed.lpf", stream);
    CHECK(read_whole_file_bytes(dir / "feed.lpf") == stream);
    CHECK(looks_like_frame_stream(stream));
    const std::string text = "{\"match\": 7, \"seq\": 1}\n";
    CHECK_FALSE(
        looks_like_frame_stream({reinterpret_cast<const std::uint8_t*>(text.data()), text.size()}));
    CHECK_THROWS_WITH(read_whole_file_bytes(dir / "absent.lpf"),
                      Catch::Matchers::Contains("absent.lpf: cannot open the file: No such file"));
    std::filesystem::remove_all(dir);
}
