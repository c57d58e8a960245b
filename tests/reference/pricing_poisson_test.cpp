// Plain Poisson path: with every state multiplier 1 and κ = ∞ the goals to come are independent
// Poisson, the final-time result is the Skellam distribution and the score grid the product of
// Poisson pmfs. Checked against SciPy (scipy.stats.skellam / poisson, Debian's python3-scipy)
// and Boost.Math (boost/math/distributions/poisson.hpp).
#include <boost/math/distributions/poisson.hpp>
#include <catch2/catch.hpp>

#include <cmath>
#include <string>

#include "liveprob/core/pricing.hpp"
#include "liveprob/core/score_chain.hpp"
#include "liveprob/core/timing.hpp"
#include "pricing_fixtures.hpp"

using namespace liveprob;

using namespace liveprob::core;
using liveprob::test::at_minute;
using liveprob::test::pricing_state;
using liveprob::test::scipy_values;

namespace {

struct Case {
    double home = 0, away = 0;
    MatchClock clock;
    int home_score = 0, away_score = 0;
};

const Case kCases[] = {
    {1.45, 1.10, {Period::pre_match, 0}, 0, 0},
    {1.80, 0.75, at_minute(Period::first_half, 23.5), 1, 0},
    {1.20, 1.30, at_minute(Period::second_half, 61.0), 0, 2},
    {2.10, 1.60, at_minute(Period::second_half, 88.0), 2, 2},
};

std::string num(double v) {
    char buf[64];
    std::snprintf(buf, sizeof buf, "%.17g", v);
    return buf;
}

}  // namespace

TEST_CASE("plain model: full-time result equals Skellam and the grid the Poisson product (SciPy)") {
    PricingModel model(ModelParams::plain_poisson());
    const TimingCurve curve(ModelParams::plain_poisson().timing, CompetitionFormat{});
    for (const Case& c : kCases) {
        PricingState st = pricing_state(c.home, c.away, c.clock, c.home_score, c.away_score);
        Outputs out;
        model.price(st, out);
        const double tau = curve.remaining_regulation(c.clock, std::nullopt);
        const double mh = c.home * tau, ma = c.away * tau;
        // SciPy scipy.stats.skellam: P(offset + X - Y > 0), = 0, < 0.
        const auto sk = scipy_values("skellam " + num(mh) + " " + num(ma) + " " +
                                     std::to_string(c.home_score - c.away_score));
        REQUIRE(sk.size() == 3);
        CHECK(out.p_home == Approx(sk[0]).margin(1e-12));
        CHECK(out.p_draw == Approx(sk[1]).margin(1e-12));
        CHECK(out.p_away == Approx(sk[2]).margin(1e-12));
        // SciPy scipy.stats.poisson pmfs, product per cell.
        const auto ph = scipy_values("poisson " + num(mh) + " " + std::to_string(kGrid - 1));
        const auto pa = scipy_values("poisson " + num(ma) + " " + std::to_string(kGrid - 1));
        REQUIRE(ph.size() == kGrid + 1);
        REQUIRE(pa.size() == kGrid + 1);
        for (std::size_t i = 0; i < kGrid; ++i) {
            for (std::size_t j = 0; j < kGrid; ++j) {
                CHECK(out.goals_added[i][j] == Approx(ph[i] * pa[j]).margin(1e-12));
            }
        }
        // Tail: 1 - P(X <= 15) P(Y <= 15) from SciPy's cdfs.
        CHECK(out.tail_mass == Approx(1.0 - ph[kGrid] * pa[kGrid]).margin(1e-12));
    }
}

TEST_CASE("plain model: grid, result and expectations against Boost.Math Poisson") {
    PricingModel model(ModelParams::plain_poisson());
    const TimingCurve curve(ModelParams::plain_poisson().timing, CompetitionFormat{});
    for (const Case& c : kCases) {
        PricingState st = pricing_state(c.home, c.away, c.clock, c.home_score, c.away_score);
        Outputs out;
        model.price(st, out);
        const double tau = curve.remaining_regulation(c.clock, std::nullopt);
        const boost::math::poisson_distribution<double> h(c.home * tau), a(c.away * tau);
        double home = 0, draw = 0, away = 0, both = 0;
        for (int i = 0; i < 60; ++i) {
            for (int j = 0; j < 60; ++j) {
                const double p = boost::math::pdf(h, i) * boost::math::pdf(a, j);
                const int fh = c.home_score + i, fa = c.away_score + j;
                (fh > fa ? home : fh < fa ? away : draw) += p;
                if (fh >= 1 && fa >= 1) both += p;
                if (i < kGrid && j < kGrid) {
                    CHECK(
                        out.goals_added[static_cast<std::size_t>(i)][static_cast<std::size_t>(j)] ==
                        Approx(p).margin(1e-12));
                }
            }
        }
        CHECK(out.p_home == Approx(home).margin(1e-12));
        CHECK(out.p_draw == Approx(draw).margin(1e-12));
        CHECK(out.p_away == Approx(away).margin(1e-12));
        CHECK(out.p_both_score == Approx(both).margin(1e-12));
        CHECK(out.expected_home_goals == Approx(c.home_score + c.home * tau).epsilon(1e-13));
        CHECK(out.expected_away_goals == Approx(c.away_score + c.away * tau).epsilon(1e-13));
        // Totals: the sum of independent Poissons is Poisson (Boost.Math cdf).
        const boost::math::poisson_distribution<double> total((c.home + c.away) * tau);
        for (int k = 0; k < kTotalsLines; ++k) {
            const int room = k - c.home_score - c.away_score;
            const double under = room < 0 ? 0.0 : boost::math::cdf(total, room);
            CHECK(out.p_over[static_cast<std::size_t>(k)] == Approx(1.0 - under).margin(1e-12));
        }
    }
}

TEST_CASE("score chain with constant rates equals the product of Poisson pmfs (Boost.Math)") {
    // The uniformized chain, not the closed form: equal rates in every score state.
    ScoreChain chain;
    ScoreGrid grid;
    const double rate_h = 1.35, rate_a = 0.95, exposure = 0.8;
    ClassRates r;
    r.home.fill(rate_h);
    r.away.fill(rate_a);
    chain.solve(r, 0, exposure, grid);
    const boost::math::poisson_distribution<double> h(rate_h * exposure), a(rate_a * exposure);
    double sum = 0.0;
    for (std::size_t i = 0; i < kGrid; ++i) {
        for (std::size_t j = 0; j < kGrid; ++j) {
            CHECK(grid.cell[i][j] == Approx(boost::math::pdf(h, static_cast<double>(i)) *
                                            boost::math::pdf(a, static_cast<double>(j)))
                                         .margin(1e-12));
            sum += grid.cell[i][j];
        }
    }
    CHECK(sum + grid.overflow_total() == Approx(1.0).margin(1e-12));
    const double inside = boost::math::cdf(h, kGrid - 1.0) * boost::math::cdf(a, kGrid - 1.0);
    CHECK(grid.overflow_total() == Approx(1.0 - inside).margin(1e-12));
}
