// The replay's scores against an independent numpy computation (Debian's python3-numpy), run
// by /usr/bin/python3 inside this test on the same forecasts.
#include <catch2/catch.hpp>

#include <cstdint>
#include <fstream>
#include <map>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include <fmt/format.h>

#include "liveprob/scoring/bucket_scores.hpp"
#include "test_env.hpp"

using namespace liveprob::scoring;
using Catch::Detail::Approx;

namespace {
// Uniform in [0, 1) from 53 random bits (portable, unlike std::uniform_real_distribution).
double unit_uniform(std::mt19937_64& rng) { return static_cast<double>(rng() >> 11) * 0x1.0p-53; }
}  // namespace

TEST_CASE("scores and calibration match numpy on 5000 random forecasts", "[scoring][numpy]") {
    std::mt19937_64 rng(20261201);
    ScoreAccumulator acc;
    const auto dir = liveprob::test::scratch_dir("scoring-numpy");
    const auto csv = dir / "forecasts.csv";
    {
        std::ofstream out(csv);
        for (int i = 0; i < 5000; ++i) {
            // Forecasts spread over the simplex, a few exactly at 0 or 1 to reach the edges.
            double a = unit_uniform(rng), b = unit_uniform(rng), c = unit_uniform(rng);
            if (i % 97 == 0) {
                a = 1.0;
                b = 0.0;
                c = 0.0;
            }
            const double sum = a + b + c;
            const Forecast f{a / sum, b / sum, c / sum};
            const auto observed = static_cast<Outcome>(rng() % 3);
            acc.add(f, observed);
            out << fmt::format("{:.17g},{:.17g},{:.17g},{}\n", f[0], f[1], f[2],
                               static_cast<int>(observed));
        }
    }
    const auto script = liveprob::test::source_dir() / "tests/reference/scoring_reference.py";
    const auto result = liveprob::test::run_command(liveprob::test::system_python() + " " +
                                                    script.string() + " " + csv.string());
    REQUIRE(result.exit_code == 0);

    std::map<std::string, std::string> lines;
    std::istringstream in(result.out);
    for (std::string line; std::getline(in, line);) {
        const auto space = line.find(' ');
        if (space != std::string::npos) lines[line.substr(0, space)] = line.substr(space + 1);
    }
    REQUIRE(lines.count("rps") == 1);
    CHECK(acc.mean_brier() == Approx(std::stod(lines["brier"])).epsilon(1e-12));
    CHECK(acc.mean_log_loss() == Approx(std::stod(lines["log_loss"])).epsilon(1e-12));
    CHECK(acc.mean_rps() == Approx(std::stod(lines["rps"])).epsilon(1e-12));
    CHECK(acc.calibration().expected_calibration_error() ==
          Approx(std::stod(lines["ece"])).epsilon(1e-10));
    for (int k = 0; k < kOutcomes; ++k) {
        const auto o = static_cast<Outcome>(k);
        CHECK(acc.calibration().expected_calibration_error(o) ==
              Approx(std::stod(lines[fmt::format("ece{}", k)])).epsilon(1e-10));
        std::istringstream counts(lines[fmt::format("bins{}", k)]);
        for (const auto& bin : acc.calibration().diagram(o)) {
            std::uint64_t expected = 0;
            counts >> expected;
            CHECK(bin.count == expected);
        }
    }
}
