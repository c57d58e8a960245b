// Gauss–Laguerre strength nodes: an n-node Gauss rule integrates polynomials of degree < 2n
// exactly, so the weighted moments must equal the Gamma moments Γ(a + k) / Γ(a), here from
// Boost.Math (boost/math/special_functions/gamma.hpp, tgamma_ratio).
#include <boost/math/special_functions/gamma.hpp>
#include <catch2/catch.hpp>

#include <cmath>

#include "liveprob/core/quadrature.hpp"

using namespace liveprob;

using namespace liveprob::core;

TEST_CASE("Gamma quadrature reproduces the moments of degree below 2n") {
    for (const double shape : {0.7, 3.0, 25.0, 41.5}) {
        for (const int n : {1, 2, 4, 6, 10}) {
            GammaQuadrature q;
            gamma_quadrature(shape, n, q);
            REQUIRE(q.count == n);
            for (int k = 0; k < 2 * n; ++k) {
                double m = 0.0;
                for (int i = 0; i < n; ++i)
                    m += q.weight[static_cast<std::size_t>(i)] *
                         std::pow(q.node[static_cast<std::size_t>(i)], k);
                const double exact = boost::math::tgamma_ratio(shape + k, shape);  // Boost.Math
                INFO("shape " << shape << " nodes " << n << " degree " << k);
                CHECK(m == Approx(exact).epsilon(1e-10));
            }
        }
    }
}

TEST_CASE("Gamma quadrature rejects bad arguments") {
    GammaQuadrature q;
    CHECK_THROWS_AS(gamma_quadrature(0.0, 4, q), std::invalid_argument);
    CHECK_THROWS_AS(gamma_quadrature(2.0, 0, q), std::invalid_argument);
    CHECK_THROWS_AS(gamma_quadrature(2.0, kMaxQuadratureNodes + 1, q), std::invalid_argument);
}
