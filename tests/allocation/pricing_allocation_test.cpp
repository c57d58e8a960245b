// price() allocates nothing in steady state. Counted by replacing the global operator new in
// this test program: every heap allocation of the process goes through it.
#include <catch2/catch.hpp>

#include <atomic>
#include <cstdlib>
#include <new>

#include "heap_allocation_counter.hpp"
#include "liveprob/core/intensity.hpp"
#include "liveprob/core/pricing.hpp"
#include "pricing_fixtures.hpp"

using namespace liveprob;

using namespace liveprob::core;

TEST_CASE("the allocation counter sees heap allocations") {
    static double* volatile probe = nullptr;  // volatile: the pair cannot be optimised away
    const long before = test::heap_allocations();
    probe = new double(1.0);
    delete probe;
    CHECK(test::heap_allocations() == before + 1);
}

TEST_CASE("pricing allocates nothing per update, plain and full model") {
    for (const bool full : {false, true}) {
        const ModelParams params = full ? ModelParams{} : ModelParams::plain_poisson();
        PricingModel model(params);
        PricingState st =
            test::pricing_state(1.5, 1.1, test::at_minute(Period::first_half, 10), 0, 0);
        if (full) {
            st.format.extra_time = st.format.shootout = true;
            st.reds = {0, 1};
            const StrengthPosterior h = strength_posterior(params, 0, 0.2);
            st.theta_shape = {h.shape, h.shape};
            st.theta_rate = {h.rate, h.rate};
        }
        Outputs out;
        model.price(st, out);  // warm-up: caches the quadrature nodes
        const long before = test::heap_allocations();
        for (int minute = 11; minute < 90; ++minute) {
            st.clock =
                test::at_minute(minute < 45 ? Period::first_half : Period::second_half, minute);
            if (minute == 60) st.goals[0] = 1;
            if (minute == 60 && full) st.theta_shape[0] += 1;  // new shape: nodes recomputed
            st.theta_rate[0] += 0.01;
            model.price(st, out);
        }
        const long allocations = test::heap_allocations() - before;  // before Catch's own messages
        INFO((full ? "full" : "plain") << " model");
        CHECK(allocations == 0);
    }
}
