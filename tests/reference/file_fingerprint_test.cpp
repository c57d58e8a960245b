// SHA-256 of the report's input fingerprints (adapters/files/file_fingerprint.hpp) against
// FIPS 180-4's example "abc" and Python's hashlib (Debian's /usr/bin/python3) at every length
// around the padding's block boundaries.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <fstream>
#include <sstream>

#include "liveprob/files/file_fingerprint.hpp"
#include "test_env.hpp"

namespace test = liveprob::test;

TEST_CASE("SHA-256 against FIPS 180-4's example and hashlib", "[fingerprint]") {
    // FIPS 180-4 (Secure Hash Standard), example "abc".
    CHECK(liveprob::files::sha256_hex("abc") ==
          "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    const auto dir = test::scratch_dir("sha256");
    std::string files, expected;
    for (const int length : {0, 1, 55, 56, 63, 64, 65, 119, 120, 127, 128, 1000, 70000}) {
        std::string bytes;
        for (int i = 0; i < length; ++i) bytes.push_back(static_cast<char>((i * 37 + 11) % 256));
        const auto path = dir / fmt::format("{}.bin", length);
        std::ofstream(path, std::ios::binary) << bytes;
        files += " " + path.string();
        expected += liveprob::files::file_sha256_hex(path.string()) + "\n";
    }
    const auto run = test::python_sha256(files);
    REQUIRE(run.exit_code == 0);
    CHECK(run.out == expected);
}
