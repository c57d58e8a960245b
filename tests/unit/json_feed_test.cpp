// The JSON-lines form: every kind converts both ways (and agrees with the FlatBuffers form),
// and every class of error names its line and its field.
#include <catch2/catch.hpp>

#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/json_feed.hpp"
#include "sample_messages.hpp"

using namespace liveprob;

using namespace liveprob::core;
using namespace liveprob::protocol;

namespace {

std::string error_of(std::string_view line, std::size_t number = 12) {
    JsonFeedReader reader;
    const auto r = reader.read_line(line, number);
    CHECK(r.kind == JsonLineKind::bad);
    CHECK_FALSE(r.message.has_value());
    return r.error;
}

const char* const kGoal =
    R"({"match": 7, "seq": 12, "time_us": 1790000000000000, "period": "second_half", "clock": "67:12", "type": "goal", "side": "home", "penalty": true})";

}  // namespace

TEST_CASE("every kind converts to a JSON line and back unchanged", "[json_feed]") {
    JsonFeedReader reader;
    std::size_t line = 0;
    for (const auto& message : test::sample_messages()) {
        const std::string text = to_json_line(message);
        INFO(text);
        CHECK(text.find('\n') == std::string::npos);
        const auto r = reader.read_line(text, ++line);
        REQUIRE(r.kind == JsonLineKind::message);
        CHECK(*r.message == message);
        CHECK(r.kind_hint == kind_name(message.body));
    }
}

TEST_CASE("JSON and FlatBuffers forms agree", "[json_feed]") {
    JsonFeedReader reader;
    for (const auto& message : test::sample_messages()) {
        const auto from_wire = decode_feed_message(encode_feed_message(message));
        REQUIRE(from_wire.message.has_value());
        const auto back = reader.read_line(to_json_line(*from_wire.message), 1);
        REQUIRE(back.message.has_value());
        CHECK(decode_feed_message(encode_feed_message(*back.message)).message == message);
    }
}

TEST_CASE("a hand-typed line reads as documented", "[json_feed]") {
    JsonFeedReader reader;
    const auto r = reader.read_line(kGoal, 1);
    REQUIRE(r.kind == JsonLineKind::message);
    const InboundMessage& m = *r.message;
    CHECK(m.header.match_id == 7);
    CHECK(m.header.source_seq == 12);
    CHECK(m.header.clock == MatchClock{Period::second_half, (67 * 60 + 12) * 1000});
    CHECK(std::get<Goal>(m.body) == Goal{Side::home, true, false});

    // Period fields of period_start / stoppage default to the clock's period.
    const auto stoppage = reader.read_line(
        R"({"match": 7, "seq": 13, "time_us": 0, "period": "second_half", "clock": "90:00", "type": "stoppage", "minutes": 5})",
        2);
    REQUIRE(stoppage.message.has_value());
    CHECK(std::get<StoppageAnnounced>(stoppage.message->body) ==
          StoppageAnnounced{Period::second_half, 5});
}

TEST_CASE("blank lines, comments and CRLF endings", "[json_feed]") {
    JsonFeedReader reader;
    CHECK(reader.read_line("", 1).kind == JsonLineKind::skipped);
    CHECK(reader.read_line("   \t", 2).kind == JsonLineKind::skipped);
    CHECK(reader.read_line("  # a note for people", 3).kind == JsonLineKind::skipped);
    CHECK(reader.read_line(std::string(kGoal) + "\r", 4).kind == JsonLineKind::message);
}

TEST_CASE("each class of error names the line and the field", "[json_feed]") {
    // Not JSON, or not an object: the line is named, there is no field to name.
    CHECK(error_of("{\"match\": 7,", 3).rfind("line 3: not valid JSON (", 0) == 0);
    CHECK(error_of("[1, 2]", 4) == "line 4: expected one JSON object, got [1,2]");
    // Wrong choice of a named value.
    CHECK(
        error_of(
            R"({"match": 7, "seq": 12, "time_us": 0, "period": "second_half", "clock": "67:12", "type": "goal", "side": "hme"})") ==
        "line 12: field 'side': expected 'home' or 'away', got 'hme'");
    // Unknown field (a typo must not pass).
    CHECK(
        error_of(
            R"({"match": 7, "seq": 12, "time_us": 0, "period": "second_half", "clock": "67:12", "type": "goal", "side": "home", "penalti": true})") ==
        "line 12: field 'penalti': unknown field for a 'goal' message");
    // Missing required field.
    CHECK(
        error_of(
            R"({"match": 7, "time_us": 0, "period": "second_half", "clock": "67:12", "type": "goal", "side": "home"})") ==
        "line 12: field 'seq': required but missing");
    // Repeated field.
    CHECK(error_of(R"({"match": 7, "match": 8, "seq": 1})") ==
          "line 12: field 'match': given more than once");
    // Wrong JSON type.
    CHECK(
        error_of(
            R"({"match": "seven", "seq": 12, "time_us": 0, "period": "first_half", "clock": "1:00", "type": "final_whistle"})") ==
        "line 12: field 'match': expected a whole number of 0 or more, got \"seven\"");
    CHECK(
        error_of(
            R"({"match": 7, "seq": 1.5, "time_us": 0, "period": "first_half", "clock": "1:00", "type": "final_whistle"})") ==
        "line 12: field 'seq': expected a whole number of 0 or more, got 1.5");
    CHECK(
        error_of(
            R"({"match": 7, "seq": 1, "time_us": 0, "period": "first_half", "clock": "1:00", "type": "shootout_kick", "side": "home", "scored": "yes"})") ==
        "line 12: field 'scored': expected true or false, got \"yes\"");
    // Out of range for its type.
    CHECK(
        error_of(
            R"({"match": 7, "seq": 1, "time_us": 0, "period": "first_half", "clock": "1:00", "type": "score_correction", "home_goals": 70000, "away_goals": 0})") ==
        "line 12: field 'home_goals': expected a whole number 0..65535, got 70000");
    // Bad clock text.
    CHECK(
        error_of(
            R"({"match": 7, "seq": 1, "time_us": 0, "period": "first_half", "clock": "12:75", "type": "final_whistle"})") ==
        "line 12: field 'clock': expected minutes:seconds like \"67:12\", got \"12:75\"");
    // Unknown kind.
    CHECK(
        error_of(
            R"({"match": 7, "seq": 1, "time_us": 0, "period": "first_half", "clock": "1:00", "type": "corner"})")
            .rfind("line 12: field 'type': expected 'setup', 'period_start', ", 0) == 0);
    // Nested objects name the full path.
    CHECK(
        error_of(
            R"({"match": 7, "seq": 1, "time_us": 0, "period": "pre_match", "clock": "0:00", "type": "setup", "home": "A", "away": "B", "prior": {"home": 1.2, "awya": 1.0}})") ==
        "line 12: field 'prior.awya': unknown field for 'prior'");
    CHECK(
        error_of(
            R"({"match": 7, "seq": 1, "time_us": 0, "period": "pre_match", "clock": "0:00", "type": "setup", "home": "A", "away": "B", "prior": {"home": 1.2}})") ==
        "line 12: field 'prior.away': required but missing");
    // Semantic checks shared with the FlatBuffers decoder.
    CHECK(
        error_of(
            R"({"match": 7, "seq": 1, "time_us": 0, "period": "first_half", "clock": "20:00", "type": "shot_xg", "side": "away", "xg": 1.5})") ==
        "line 12: field 'xg': must be in [0, 1], got 1.5");
    CHECK(
        error_of(
            R"({"match": 7, "seq": 1, "time_us": 0, "period": "pre_match", "clock": "0:00", "type": "setup", "home": "A", "away": "B"})") ==
        "line 12: field 'prior': a setup needs 'prior' or 'ratings'");
    CHECK(
        error_of(
            R"({"match": 0, "seq": 1, "time_us": 0, "period": "first_half", "clock": "1:00", "type": "final_whistle"})")
            .rfind("line 12: field 'match': must not be 0", 0) == 0);
}

TEST_CASE("the match clock's text form", "[json_feed]") {
    CHECK(format_match_clock(0) == "00:00");
    CHECK(format_match_clock(4'032'000) == "67:12");
    CHECK(format_match_clock(4'032'250) == "67:12.250");
    CHECK(format_match_clock(6'300'000) == "105:00");
    CHECK(parse_match_clock("67:12") == 4'032'000u);
    CHECK(parse_match_clock("1:05.5") == 65'500u);
    CHECK(parse_match_clock("105:00.001") == 6'300'001u);
    for (const char* bad : {"", "67", ":12", "67:1", "67:60", "67:12.", "67:12.1234", "-1:00",
                            "+1:00", "1:-5", "67:12 ", "a:00"}) {
        INFO(bad);
        CHECK_FALSE(parse_match_clock(bad).has_value());
    }
}
