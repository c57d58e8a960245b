// The Dixon–Coles low-score correction τ against the formula of Dixon & Coles (1997), eq. 4.2:
//   τ(0,0) = 1 − λμρ,  τ(0,1) = 1 + λρ,  τ(1,0) = 1 + μρ,  τ(1,1) = 1 − ρ,  τ = 1 otherwise,
// on a worked example, and the paper's remark that τ leaves both marginal distributions
// unchanged (so the corrected score grid still sums to 1).
#include <catch2/catch.hpp>

#include <boost/math/distributions/poisson.hpp>

#include "liveprob/fit/dixon_coles.hpp"

namespace fit = liveprob::fit;

TEST_CASE("tau matches the 1997 formula on a worked example") {
    // λ = 1.5 (home), μ = 1.1 (away), ρ = −0.1, worked by hand from the formula.
    const double l = 1.5, m = 1.1, rho = -0.1;
    CHECK(fit::dixon_coles_tau(0, 0, l, m, rho) ==
          Approx(1.165).epsilon(1e-15));  // 1 − 1.5·1.1·(−0.1)
    CHECK(fit::dixon_coles_tau(0, 1, l, m, rho) == Approx(0.85).epsilon(1e-15));  // 1 + 1.5·(−0.1)
    CHECK(fit::dixon_coles_tau(1, 0, l, m, rho) == Approx(0.89).epsilon(1e-15));  // 1 + 1.1·(−0.1)
    CHECK(fit::dixon_coles_tau(1, 1, l, m, rho) == Approx(1.1).epsilon(1e-15));  // 1 − (−0.1)
    CHECK(fit::dixon_coles_tau(2, 0, l, m, rho) == 1.0);
    CHECK(fit::dixon_coles_tau(1, 2, l, m, rho) == 1.0);
    CHECK(fit::dixon_coles_tau(0, 0, l, m, 0.0) == 1.0);
}

TEST_CASE("tau keeps the Poisson margins (Dixon & Coles 1997), with Boost.Math's Poisson pmf") {
    const double l = 1.7, m = 0.9;
    for (double rho : {-0.15, -0.05, 0.08}) {
        const boost::math::poisson_distribution<double> home(l), away(m);
        double grid_total = 0.0;
        for (int x = 0; x <= 40; ++x) {
            double row = 0.0;
            for (int y = 0; y <= 40; ++y) {
                const double cell = fit::dixon_coles_tau(x, y, l, m, rho) *
                                    boost::math::pdf(home, x) * boost::math::pdf(away, y);
                row += cell;
                grid_total += cell;
            }
            CHECK(row == Approx(boost::math::pdf(home, x)).epsilon(1e-12));
        }
        CHECK(grid_total == Approx(1.0).epsilon(1e-12));
        // The outcome probabilities built on the same grid.
        const auto p = fit::outcome_probabilities(l, m, rho);
        double h = 0.0, d = 0.0;
        for (int x = 0; x <= 40; ++x)
            for (int y = 0; y <= 40; ++y) {
                const double cell = fit::dixon_coles_tau(x, y, l, m, rho) *
                                    boost::math::pdf(home, x) * boost::math::pdf(away, y);
                if (x > y) h += cell;
                if (x == y) d += cell;
            }
        CHECK(p.home == Approx(h).epsilon(1e-12));
        CHECK(p.draw == Approx(d).epsilon(1e-12));
        CHECK(p.home + p.draw + p.away == Approx(1.0).epsilon(1e-14));
    }
}
