// The project's JSON writer (protocol/json_writer.hpp) against Python's json module (Debian's
// /usr/bin/python3, the outside reference): a nasty set of strings -- every control character,
// quotes, backslashes, multi-byte UTF-8, and bytes that are not UTF-8 -- and of doubles --
// signed zero, subnormals, the largest double, powers of ten at the layout's edges, random bit
// patterns -- each compared with what Python writes, and whole documents in every layout read
// back by Python's parser. tests/reference/json_writer_reference.py says what each check is.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <cmath>
#include <cstdint>
#include <cstring>
#include <fstream>
#include <limits>
#include <random>
#include <string>
#include <vector>

#include "liveprob/protocol/json_writer.hpp"
#include "test_env.hpp"

using liveprob::protocol::JsonLayout;
using liveprob::protocol::JsonWriter;

namespace {

std::string hex(std::string_view bytes) {
    std::string out;
    for (const char c : bytes)
        out += fmt::format("{:02x}", static_cast<unsigned>(static_cast<unsigned char>(c)));
    return out;
}

std::vector<std::string> nasty_strings() {
    std::vector<std::string> s = {"",
                                  "plain",
                                  "say \"hi\"",
                                  "back\\slash",
                                  "/slash",
                                  "tab\there",
                                  "\x7f",
                                  "caf\xc3\xa9",
                                  "\xe2\x82\xac",
                                  "\xf0\x9f\x98\x80",
                                  "\xe2\x80\xa8\xe2\x80\xa9",
                                  "\xef\xbb\xbf bom",
                                  "\xf4\x8f\xbf\xbf"};
    for (int c = 0; c < 0x20; ++c) s.push_back(std::string(1, static_cast<char>(c)) + "x");
    // Not UTF-8: lone continuations, overlong forms, surrogates, beyond U+10FFFF, bytes that are
    // never UTF-8, sequences cut short in the middle and at the end.
    for (const char* bad : {"\x80",
                            "\xbf",
                            "\xc0\x80",
                            "\xc1\xbf",
                            "\xe0\x80\x80",
                            "\xe0\x9f\xbf",
                            "\xed\xa0\x80",
                            "\xed\xbf\xbf",
                            "\xf0\x80\x80\x80",
                            "\xf0\x8f\xbf\xbf",
                            "\xf4\x90\x80\x80",
                            "\xf5\x80",
                            "\xfe",
                            "\xff",
                            "\xe2\x82",
                            "a\xe2\x82z",
                            "\xf0\x9f\x98",
                            "\xf0\x9f",
                            "\xc3",
                            "\xc3\xc3\xa9",
                            "\xe2\x82\xe2\x82\xac"}) {
        s.emplace_back(bad);
    }
    std::mt19937_64 rng(20261202);
    for (int i = 0; i < 300; ++i) {  // random byte strings, biased to the high half
        std::string r;
        const auto length = rng() % 12;
        for (std::uint64_t k = 0; k < length; ++k)
            r.push_back(static_cast<char>(rng() % 3 ? 0x80 | (rng() & 0x7f) : rng() & 0xff));
        s.push_back(r);
    }
    return s;
}

std::vector<double> nasty_numbers() {
    std::vector<double> x = {0.0,
                             -0.0,
                             1.0,
                             -1.0,
                             0.1,
                             0.2,
                             0.3,
                             1.0 / 3.0,
                             2.0 / 3.0,
                             5e-324,
                             -5e-324,
                             2.2250738585072009e-308,
                             2.2250738585072014e-308,
                             std::numeric_limits<double>::max(),
                             -std::numeric_limits<double>::max(),
                             9007199254740993.0,
                             9007199254740992.0,
                             0x1p53,
                             0x1p-1074 * 3,
                             1e21,
                             1e22,
                             1e23,
                             123456789012345680.0};
    for (int e = -8; e <= 18; ++e) {  // around the switch between fixed and exponent notation
        const double p = std::pow(10.0, e);
        x.insert(x.end(), {p, std::nextafter(p, 0.0), std::nextafter(p, 1e300), 1.5 * p, -p});
    }
    std::mt19937_64 rng(20261203);
    while (x.size() < 3000) {
        const std::uint64_t bits = rng();
        double d = 0.0;
        std::memcpy(&d, &bits, sizeof d);
        if (std::isfinite(d)) x.push_back(d);
        x.push_back(static_cast<double>(rng() >> 11) * 0x1.0p-53);  // probabilities, as published
    }
    return x;
}

}  // namespace

TEST_CASE("json writer output equals Python's json module on nasty strings and numbers",
          "[json][python]") {
    const auto dir = liveprob::test::scratch_dir("json-python");
    const auto strings = nasty_strings();
    const auto numbers = nasty_numbers();
    std::ofstream checks(dir / "checks.txt", std::ios::binary);
    for (const auto& s : strings)
        checks << "s " << hex(s) << ' ' << liveprob::protocol::json_string(s) << '\n';
    for (const double d : numbers) {
        std::string ours;
        liveprob::protocol::append_json_number(ours, d);
        checks << fmt::format("n {:a} {}\n", d, ours);
    }
    // Whole documents, one per layout: every string and number as members of one object.
    std::ofstream inputs(dir / "inputs.txt", std::ios::binary);
    for (const auto& s : strings) inputs << "s " << hex(s) << '\n';
    for (const double d : numbers) inputs << fmt::format("n {:a}\n", d);
    inputs.close();
    for (const auto layout : {JsonLayout::compact, JsonLayout::spaced, JsonLayout::indented}) {
        std::string doc;
        JsonWriter json(doc, layout);
        json.begin_object();
        std::size_t i = 0;
        for (const auto& s : strings) json.member(fmt::format("s{}", i++), s);
        for (const double d : numbers) json.member(fmt::format("n{}", i++), d);
        json.end_object();
        const auto path = dir / fmt::format("doc-{}.json", static_cast<int>(layout));
        std::ofstream(path, std::ios::binary) << doc;
        checks << "doc " << path.string() << ' ' << (dir / "inputs.txt").string() << '\n';
    }
    checks.close();

    const auto script = liveprob::test::source_dir() / "tests/reference/json_writer_reference.py";
    const auto result =
        liveprob::test::run_command(liveprob::test::system_python() + " " + script.string() + " " +
                                    (dir / "checks.txt").string());
    INFO(result.out);
    CHECK(result.exit_code == 0);
    CHECK(result.out.find(fmt::format("checked {}", strings.size() + numbers.size() + 3)) !=
          std::string::npos);
}
