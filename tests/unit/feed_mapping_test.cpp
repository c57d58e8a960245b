// The declarative feed mapping (protocol/feed_mapping.hpp): JSON Pointer evaluation checked
// against the worked examples of RFC 6901, the provider clock forms, the two example rules
// files replayed against the native feed they were made from, and every way a provider line
// or a rules file can be wrong.
#include <catch2/catch.hpp>

#include <map>
#include <optional>

#include "liveprob/core/match.hpp"
#include "liveprob/protocol/feed_mapping.hpp"
#include "liveprob/protocol/json_feed.hpp"
#include "liveprob/protocol/json_pointer.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/protocol/whole_file.hpp"
#include "test_env.hpp"

using namespace liveprob;
using protocol::JsonLineKind;
using protocol::JsonPointer;

namespace {

std::filesystem::path mappings_dir() { return test::source_dir() / "protocol" / "mappings"; }

std::vector<std::string> lines_of(const std::filesystem::path& path) {
    std::vector<std::string> lines;
    std::istringstream in(protocol::read_whole_file(path));
    std::string line;
    while (std::getline(in, line)) lines.push_back(line);
    return lines;
}

std::vector<core::InboundMessage> native_messages() {
    protocol::JsonFeedReader reader;
    std::vector<core::InboundMessage> out;
    std::size_t number = 0;
    for (const auto& line : lines_of(mappings_dir() / "native.sample.jsonl")) {
        auto r = reader.read_line(line, ++number);
        REQUIRE(r.kind == JsonLineKind::message);
        out.push_back(std::move(*r.message));
    }
    return out;
}

// Every update the engine produces for a feed, encoded: equal bytes are equal numbers, bit for
// bit (the encoder writes every output, the score grid included).
std::vector<std::vector<std::uint8_t>> replayed(const std::vector<core::InboundMessage>& feed) {
    std::map<std::uint64_t, core::Match> matches;
    protocol::UpdateEncoder encoder;
    std::vector<std::vector<std::uint8_t>> updates;
    std::uint64_t output_seq = 0;
    for (const auto& m : feed) {
        auto it = matches.find(m.header.match_id);
        if (it == matches.end()) {
            it = matches
                     .try_emplace(m.header.match_id, m.header.match_id,
                                  std::get<core::MatchSetup>(m.body), core::ModelParams{})
                     .first;
        } else {
            const auto r = it->second.apply(m);
            if (r.verdict != core::Verdict::accepted && r.verdict != core::Verdict::late) continue;
        }
        const auto bytes = encoder.encode({m.header.match_id, ++output_seq, m.header.source_seq},
                                          it->second.outputs());
        updates.emplace_back(bytes.begin(), bytes.end());
    }
    return updates;
}

protocol::FeedMapping example(const std::string& name) {
    return protocol::FeedMapping::from_file(mappings_dir() / (name + ".rules.json"));
}

// A small mapping for the error cases: nested fields, a team lookup, a clock in minute_plus.
const char* kTinyRules = R"({
  "name": "tiny",
  "header": {"match": "/m", "seq": "/s", "time_us": {"value": 0},
             "period": {"from": "/p", "values": {"1": "first_half", "2": "second_half"}},
             "clock": {"from": "/c", "clock": "minute_plus"}},
  "kind": "/k",
  "kinds": {
    "S": {"type": "setup", "teams": {"home": "/t/h", "away": "/t/a"},
          "fields": {"clock": {"value": "00:00"}, "period": {"value": "pre_match"},
                     "home": "/hn", "away": "/an", "prior.home": "/x/0", "prior.away": "/x/1"}},
    "G": {"type": "goal", "fields": {"side": {"from": "/team", "team": true}}},
    "X": {"type": "shot_xg", "fields": {"side": {"from": "/team", "team": true}, "xg": "/xg"}},
    "K": {"skip": true}
  }
})";

}  // namespace

// RFC 6901 section 5 ("JSON String Representation"): the document and each pointer with the
// value it must give, exactly as the RFC lists them.
TEST_CASE("JSON pointers give the values of RFC 6901 section 5's worked example",
          "[unit][feed_mapping]") {
    const std::string document = R"({
      "foo": ["bar", "baz"],
      "": 0,
      "a/b": 1,
      "c%d": 2,
      "e^f": 3,
      "g|h": 4,
      "i\\j": 5,
      "k\"l": 6,
      " ": 7,
      "m~n": 8
   })";
    const std::vector<std::pair<std::string, std::string>> cases = {
        {"/foo", R"(["bar","baz"])"},
        {"/foo/0", R"("bar")"},
        {"/", "0"},
        {"/a~1b", "1"},
        {"/c%d", "2"},
        {"/e^f", "3"},
        {"/g|h", "4"},
        {"/i\\j", "5"},
        {"/k\"l", "6"},
        {"/ ", "7"},
        {"/m~0n", "8"},
    };
    for (const auto& [pointer, value] : cases) {
        INFO("pointer " << pointer);
        const auto got = protocol::evaluate_json_pointer(document, JsonPointer::parse(pointer));
        REQUIRE(got.has_value());
        CHECK(*got == value);
    }
    // "" is the whole document (section 5's first row).
    const auto whole = protocol::evaluate_json_pointer(document, JsonPointer::parse(""));
    REQUIRE(whole.has_value());
    CHECK(whole->starts_with(R"({"foo":["bar","baz"],"":0,)"));
}

TEST_CASE("JSON pointers: escapes, array indices and what refers to nothing",
          "[unit][feed_mapping]") {
    // Section 4: "~01" unescapes to "~1" (never '/'): the escapes are read once, left to right.
    CHECK(JsonPointer::parse("/~01").tokens() == std::vector<std::string>{"~1"});
    CHECK(JsonPointer::parse("/a//b").tokens() == std::vector<std::string>{"a", "", "b"});
    const std::string doc = R"({"a": [10, 20, {"b": null}], "~1": "tilde-one"})";
    CHECK(protocol::evaluate_json_pointer(doc, JsonPointer::parse("/~01")) == "\"tilde-one\"");
    CHECK(protocol::evaluate_json_pointer(doc, JsonPointer::parse("/a/2/b")) == "null");
    // Section 4: an index is "0" or digits without a leading zero; "-" is past the end.
    CHECK_FALSE(protocol::evaluate_json_pointer(doc, JsonPointer::parse("/a/01")));
    CHECK_FALSE(protocol::evaluate_json_pointer(doc, JsonPointer::parse("/a/-")));
    CHECK_FALSE(protocol::evaluate_json_pointer(doc, JsonPointer::parse("/a/3")));
    CHECK_FALSE(protocol::evaluate_json_pointer(doc, JsonPointer::parse("/a/0/x")));
    CHECK_FALSE(protocol::evaluate_json_pointer(doc, JsonPointer::parse("/A")));
    // Section 3: a pointer is empty or starts with '/'; '~' only as "~0" or "~1".
    CHECK_THROWS_AS(JsonPointer::parse("a/b"), protocol::JsonPointerError);
    CHECK_THROWS_AS(JsonPointer::parse("/a~2"), protocol::JsonPointerError);
    CHECK_THROWS_AS(JsonPointer::parse("/a~"), protocol::JsonPointerError);
    CHECK_THROWS_AS(protocol::evaluate_json_pointer("{", JsonPointer::parse("")),
                    protocol::JsonPointerError);
}

TEST_CASE("provider clocks: minutes and seconds, stoppage written as a plus, whole minutes",
          "[unit][feed_mapping]") {
    using protocol::parse_provider_clock;
    CHECK(parse_provider_clock("minutes_seconds", "67:12") == 4'032'000u);
    CHECK(parse_provider_clock("minutes_seconds", "67:12.250") == 4'032'250u);
    CHECK(parse_provider_clock("minutes_seconds", "45+1:30") == 2'790'000u);  // 46:30
    CHECK(parse_provider_clock("minutes_seconds", "90+4:05") == 5'645'000u);
    CHECK(parse_provider_clock("minute_plus", "67") == 4'020'000u);
    CHECK(parse_provider_clock("minute_plus", "45+2") == 2'820'000u);
    CHECK(parse_provider_clock("minute_plus", "90+4'") == 5'640'000u);
    CHECK_FALSE(parse_provider_clock("minutes_seconds", "67"));
    CHECK_FALSE(parse_provider_clock("minutes_seconds", "67:75"));
    CHECK_FALSE(parse_provider_clock("minutes_seconds", "+1:30"));
    CHECK_FALSE(parse_provider_clock("minute_plus", "45+"));
    CHECK_FALSE(parse_provider_clock("minute_plus", "4a"));
    CHECK_FALSE(parse_provider_clock("minute_plus", "45++2"));
}

TEST_CASE(
    "feed mappings: the two invented providers' samples map to the native feed, and replay "
    "to bit-identical outputs",
    "[unit][feed_mapping]") {
    const auto native = native_messages();
    REQUIRE(native.size() > 150);
    const auto expected = replayed(native);
    for (const std::string provider : {"harbour", "meadow"}) {
        INFO("provider " << provider);
        protocol::FeedMapper mapper(example(provider));
        std::vector<core::InboundMessage> mapped;
        std::size_t number = 0, skipped = 0;
        for (const auto& line : lines_of(mappings_dir() / (provider + ".sample.jsonl"))) {
            auto r = mapper.map_line(line, ++number);
            INFO("line " << number << ": " << r.error);
            REQUIRE(r.kind != JsonLineKind::bad);
            if (r.kind == JsonLineKind::skipped) {
                ++skipped;
                continue;
            }
            const auto& want = native.at(mapped.size());
            CHECK(protocol::to_json_line(*r.message) == protocol::to_json_line(want));
            CHECK(*r.message == want);
            mapped.push_back(std::move(*r.message));
        }
        CHECK(skipped == 5);  // one keep-alive per match, which the rules skip
        REQUIRE(mapped.size() == native.size());
        const auto got = replayed(mapped);
        REQUIRE(got.size() == expected.size());
        for (std::size_t i = 0; i < got.size(); ++i) {
            INFO("update " << i);
            CHECK(got[i] == expected[i]);
        }
    }
}

TEST_CASE("feed mappings: a line the rules cannot map is refused naming its line and field",
          "[unit][feed_mapping]") {
    protocol::FeedMapper mapper(protocol::FeedMapping::from_text(kTinyRules, "tiny.json"));
    const auto setup = mapper.map_line(
        R"({"k": "S", "m": 7, "s": 1, "p": 1, "hn": "Kestrel Vale", "an": "Orrin Bay",
            "t": {"h": "KV", "a": "OB"}, "x": [1.4, 1.1]})",
        1);
    REQUIRE(setup.kind == JsonLineKind::message);
    const auto goal =
        mapper.map_line(R"({"k": "G", "m": 7, "s": 2, "p": 2, "c": "45+2", "team": "OB"})", 2);
    REQUIRE(goal.kind == JsonLineKind::message);
    CHECK(std::get<core::Goal>(goal.message->body).side == core::Side::away);
    CHECK(goal.message->header.clock.clock_ms == 2'820'000u);
    CHECK(mapper.map_line(R"({"k": "K"})", 3).kind == JsonLineKind::skipped);
    CHECK(mapper.map_line("# a comment", 4).kind == JsonLineKind::skipped);

    const std::vector<std::pair<std::string, std::string>> bad = {
        {R"({"k": "Q", "m": 7})", "line 9: field '/k': no rule for the kind \"Q\""},
        {R"({"m": 7})", "line 9: field '/k': required but missing (for 'type')"},
        {R"({"k": "G", "m": 7, "s": 3, "p": 1, "c": "12"})",
         "line 9: field '/team': required but missing (for 'side')"},
        {R"({"k": "G", "m": 7, "s": 3, "p": 1, "c": "12", "team": "ZZ"})",
         "line 9: field '/team': team \"ZZ\" is neither side of match 7 (\"KV\" v \"OB\")"},
        {R"({"k": "G", "m": 8, "s": 3, "p": 1, "c": "12", "team": "KV"})",
         "line 9: field '/team': team \"KV\": no setup of this match named its teams"},
        {R"({"k": "G", "m": 7, "s": 3, "p": 3, "c": "12", "team": "KV"})",
         "line 9: field '/p': \"3\" is not in the rules' values for 'period'"},
        {R"({"k": "G", "m": 7, "s": 3, "p": 1, "c": "12:30", "team": "KV"})",
         "line 9: field '/c': expected a clock like \"67\" or \"45+2\", got \"12:30\""},
        {R"({"k": "G", "m": 7, "s": 3, "p": 1, "c": {"min": 12}, "team": "KV"})",
         "line 9: field '/c': expected a single value, got {\"min\":12}"},
        {R"({"k": "X", "m": 7, "s": 3, "p": 1, "c": "12", "team": "KV", "xg": 1.5})",
         "line 9: field '/xg': must be in [0, 1], got 1.5 (mapped to 'xg')"},
        {R"({"k": "X", "m": "7", "s": 3, "p": 1, "c": "12", "team": "KV", "xg": 0.1})",
         "line 9: field '/team': team \"KV\": no setup of this match named its teams"},
        {R"({"k": "S", "m": 9, "s": 1, "p": 1, "hn": "A", "an": "B", "t": {"h": 1, "a": 2},
             "x": [1.4]})",
         "line 9: field '/x/1': required but missing (for 'prior.away')"},
        {R"([1, 2])", "line 9: expected one JSON object, got [1,2]"},
    };
    for (const auto& [line, error] : bad) {
        const auto r = mapper.map_line(line, 9);
        CHECK(r.kind == JsonLineKind::bad);
        CHECK(r.error == error);
        CHECK(r.error.find('\n') == std::string::npos);
    }
    const auto not_json = mapper.map_line("{\"k\": ", 10);
    CHECK(not_json.kind == JsonLineKind::bad);
    CHECK(not_json.error.starts_with("line 10: not valid JSON"));
    // A refused line changes nothing: match 7 still maps as before.
    CHECK(mapper.map_line(R"({"k": "G", "m": 7, "s": 4, "p": 2, "c": "50", "team": "KV"})", 11)
              .kind == JsonLineKind::message);
}

TEST_CASE("feed mappings: a wrong rules file is refused naming the file and the rule",
          "[unit][feed_mapping]") {
    auto refusal = [](const std::string& text) {
        try {
            protocol::FeedMapping::from_text(text, "rules.json");
        } catch (const protocol::FeedMappingError& e) {
            return std::string(e.what());
        }
        return std::string("accepted");
    };
    const std::string header =
        R"("header": {"match": "/m", "seq": "/s", "time_us": "/t", "period": "/p", "clock": "/c"})";
    CHECK(refusal("{").starts_with("rules.json: not valid JSON"));
    CHECK(refusal(R"({"name": "x", "kind": "/k", "kinds": {"A": {"type": "goal"}}})") ==
          "rules.json: rule 'header': required but missing");
    CHECK(refusal(
              R"({"name": "x", )" + header +
              R"(, "kind": "/k", "kinds": {"A": {"type": "goal", "fields": {"side": "team"}}}})") ==
          "rules.json: rule 'kinds.A.fields.side': JSON pointer \"team\": must be empty or start "
          "with '/'");
    CHECK(refusal(R"({"name": "x", )" + header +
                  R"(, "kind": "/k", "kinds": {"A": {"type": "gaol"}}})")
              .starts_with("rules.json: rule 'kinds.A.type': "));
    CHECK(
        refusal(
            R"({"name": "x", )" + header +
            R"(, "kind": "/k", "kinds": {"A": {"type": "goal", "fields": {"side": {"frm": "/x"}}}}})") ==
        "rules.json: rule 'kinds.A.fields.side.frm': unknown field for a field's rule");
    CHECK(
        refusal(
            R"({"name": "x", )" + header +
            R"(, "kind": "/k", "kinds": {"A": {"type": "goal", "fields": {"side": {"from": "/x", "team": true, "clock": "seconds"}}}}})") ==
        "rules.json: rule 'kinds.A.fields.side': at most one of 'values', 'clock', 'scale' and "
        "'team'");
    CHECK(
        refusal(
            R"({"name": "x", )" + header +
            R"(, "kind": "/k", "kinds": {"A": {"type": "goal", "teams": {"home": "/h", "away": "/a"}}}})") ==
        "rules.json: rule 'kinds.A.teams': only a 'setup' rule names the teams");
    CHECK(refusal(R"({"name": "x", )" + header + R"(, "kind": "/k", "kinds": {}})") ==
          "rules.json: rule 'kinds': no kinds: the rules would map nothing");
    // Both examples are accepted.
    CHECK(example("harbour").name() == "harbour");
    CHECK(example("meadow").name() == "meadow");
}
