// The one JSON writer (protocol/json_writer.hpp): layouts, escaping, numbers and misuse. Its
// output is checked against Python's json module in reference/json_writer_vs_python_test.
#include <catch2/catch.hpp>

#include <cmath>
#include <limits>
#include <stdexcept>
#include <string>

#include "liveprob/protocol/json_writer.hpp"

using liveprob::protocol::append_json_number;
using liveprob::protocol::json_string;
using liveprob::protocol::JsonLayout;
using liveprob::protocol::JsonWriter;

namespace {
std::string number(double x) {
    std::string out;
    append_json_number(out, x);
    return out;
}

// The same small document in a given layout.
std::string sample(JsonLayout layout) {
    std::string out;
    JsonWriter json(out, layout);
    json.begin_object()
        .member("kind", "sample")
        .member("n", 3)
        .key("p")
        .begin_array()
        .value(0.25)
        .value(1.0);
    json.end_array().key("none").begin_object().end_object().key("empty").begin_array().end_array();
    json.key("nested")
        .begin_object()
        .member("ok", true)
        .key("missing")
        .null()
        .end_object()
        .end_object();
    CHECK(json.done());
    return out;
}
}  // namespace

TEST_CASE("json writer: compact, spaced and indented layouts of one document", "[json]") {
    CHECK(
        sample(JsonLayout::compact) ==
        R"({"kind":"sample","n":3,"p":[0.25,1],"none":{},"empty":[],"nested":{"ok":true,"missing":null}})");
    CHECK(
        sample(JsonLayout::spaced) ==
        R"({"kind": "sample", "n": 3, "p": [0.25, 1], "none": {}, "empty": [], "nested": {"ok": true, "missing": null}})");
    CHECK(sample(JsonLayout::indented) ==
          "{\n"
          "  \"kind\": \"sample\",\n"
          "  \"n\": 3,\n"
          "  \"p\": [\n"
          "    0.25,\n"
          "    1\n"
          "  ],\n"
          "  \"none\": {},\n"
          "  \"empty\": [],\n"
          "  \"nested\": {\n"
          "    \"ok\": true,\n"
          "    \"missing\": null\n"
          "  }\n"
          "}");
}

TEST_CASE("json writer: one-line containers in an indented document, and line breaks", "[json]") {
    std::string out;
    JsonWriter json(out, JsonLayout::indented);
    json.begin_object().key("teams").begin_array();
    json.begin_object_on_one_line()
        .member("name", "A")
        .key("list")
        .begin_array()
        .value(1)
        .value(2)
        .end_array()
        .end_object();
    json.begin_array_on_one_line().end_array();
    json.end_array().end_object();
    CHECK(out == "{\n  \"teams\": [\n    {\"name\": \"A\", \"list\": [1, 2]},\n    []\n  ]\n}");

    std::string lines;
    JsonWriter compact(lines);
    compact.begin_object()
        .member("a", 1)
        .line_break()
        .key("b")
        .begin_array()
        .line_break()
        .value(1)
        .line_break()
        .value(2);
    compact.line_break().end_array().end_object();
    CHECK(lines == "{\"a\":1,\n\"b\":[\n1,\n2\n]}");
}

TEST_CASE("json writer: strings are escaped in full and always valid UTF-8", "[json]") {
    CHECK(json_string("plain") == R"("plain")");
    CHECK(json_string("say \"hi\" \\ there") == R"("say \"hi\" \\ there")");
    CHECK(json_string("\b\f\n\r\t") == R"("\b\f\n\r\t")");
    CHECK(json_string(std::string("\x00\x01\x1f\x7f", 4)) == "\"\\u0000\\u0001\\u001f\x7f\"");
    CHECK(json_string("caf\xc3\xa9 \xe2\x82\xac \xf0\x9f\x98\x80") ==
          "\"caf\xc3\xa9 \xe2\x82\xac \xf0\x9f\x98\x80\"");
    // Not UTF-8: each maximal invalid sequence becomes one U+FFFD.
    const std::string r = "\xef\xbf\xbd";
    CHECK(json_string("a\x80z") == "\"a" + r + "z\"");
    CHECK(json_string("\xc0\xaf") == "\"" + r + r + "\"");          // overlong: C0 is never a lead
    CHECK(json_string("\xe2\x82z") == "\"" + r + "z\"");            // truncated 3-byte sequence
    CHECK(json_string("\xed\xa0\x80") == "\"" + r + r + r + "\"");  // a UTF-16 surrogate
    CHECK(json_string("\xf4\x90\x80\x80") == "\"" + r + r + r + r + "\"");  // above U+10FFFF
    CHECK(json_string("\xf0\x9f\x98") == "\"" + r + "\"");                  // truncated at the end
}

TEST_CASE("json writer: numbers are the shortest text that reads back, and never NaN", "[json]") {
    CHECK(number(0.0) == "0");
    CHECK(number(-0.0) == "-0");
    CHECK(number(1.0) == "1");
    CHECK(number(0.1) == "0.1");
    CHECK(number(1.0 / 3.0) == "0.3333333333333333");
    CHECK(number(0.0001) == "0.0001");
    CHECK(number(0.00001) == "1e-05");
    CHECK(number(1e15) == "1000000000000000");
    CHECK(number(1e16) == "1e+16");
    CHECK(number(123456789012345680.0) == "1.2345678901234568e+17");
    CHECK(number(5e-324) == "5e-324");
    CHECK(number(std::numeric_limits<double>::max()) == "1.7976931348623157e+308");
    CHECK_THROWS_AS(number(std::nan("")), std::invalid_argument);
    CHECK_THROWS_AS(number(std::numeric_limits<double>::infinity()), std::invalid_argument);

    std::string out;
    JsonWriter json(out);
    json.begin_array()
        .value(std::numeric_limits<std::int64_t>::min())
        .value(std::numeric_limits<std::uint64_t>::max());
    CHECK_THROWS_AS(json.value(-std::numeric_limits<double>::infinity()), std::invalid_argument);
    json.value(std::uint8_t{7}).end_array();  // the refused value left nothing behind
    CHECK(out == "[-9223372036854775808,18446744073709551615,7]");
}

TEST_CASE("json writer: misuse is a logic error", "[json]") {
    std::string out;
    JsonWriter json(out);
    CHECK_THROWS_AS(json.key("outside"), std::logic_error);
    json.begin_object();
    CHECK_THROWS_AS(json.value(1), std::logic_error);  // a value with no key
    CHECK_THROWS_AS(json.end_array(), std::logic_error);
    json.key("a");
    CHECK_THROWS_AS(json.key("b"), std::logic_error);
    CHECK_THROWS_AS(json.end_object(), std::logic_error);  // a key with no value
    json.value(1).end_object();
    CHECK(json.done());
    CHECK_THROWS_AS(json.value(2), std::logic_error);  // a second document
}
