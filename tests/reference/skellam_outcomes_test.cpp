// The default pre-match model of prices→prior (independent Poisson scores) against SciPy:
// scipy.stats.skellam for home/draw/away and scipy.stats.poisson for the total-goals line,
// run through Debian's /usr/bin/python3.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <fstream>
#include <sstream>

#include "liveprob/fit/prices_to_prior.hpp"
#include "test_env.hpp"

namespace fit = liveprob::fit;

TEST_CASE(
    "independent Poisson W/D/L equals SciPy's Skellam distribution, and over 2.5 its Poisson") {
    const std::vector<std::pair<double, double>> cases{
        {1.45, 1.1}, {2.8, 0.4}, {0.3, 0.35}, {4.2, 3.1}};
    std::string script = "import scipy.stats as s\n";
    for (const auto& [lh, la] : cases)
        script += fmt::format(
            "print(repr(s.skellam.sf(0,{0},{1})), repr(s.skellam.pmf(0,{0},{1})), "
            "repr(s.skellam.cdf(-1,{0},{1})), "
            "repr(s.poisson.sf(2,{0}+{1})))\n",
            lh, la);
    const auto dir = liveprob::test::scratch_dir("skellam_outcomes");
    const auto path = dir / "skellam.py";
    {
        std::ofstream out(path);
        out << script;
    }
    const auto result =
        liveprob::test::run_command(liveprob::test::system_python() + " " + path.string());
    REQUIRE(result.exit_code == 0);
    std::istringstream in(result.out);
    for (const auto& [lh, la] : cases) {
        double home = 0, draw = 0, away = 0, over = 0;
        REQUIRE(in >> home >> draw >> away >> over);
        const auto p = fit::independent_poisson(lh, la, 2.5);
        CHECK(p.home == Approx(home).margin(1e-12));
        CHECK(p.draw == Approx(draw).margin(1e-12));
        CHECK(p.away == Approx(away).margin(1e-12));
        CHECK(p.over == Approx(over).margin(1e-12));
    }
}
