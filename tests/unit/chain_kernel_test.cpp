// The chain step is compiled twice on x86-64 and one form is picked when the program loads.
// A processor with AVX2 and FMA must get the fast form: a dispatch rule keyed to one processor
// model once sent every other processor to the baseline, several times slower, with the same
// figures, so only a benchmark would have noticed.
#include <catch2/catch.hpp>

#include <string>

#include "liveprob/core/score_chain.hpp"

TEST_CASE("a processor with AVX2 and FMA runs the fast chain step", "[chain]") {
    const std::string kernel = liveprob::core::score_chain_kernel();
#if defined(__x86_64__) && !defined(__clang__)
    __builtin_cpu_init();
    const bool fast_capable = __builtin_cpu_supports("avx2") && __builtin_cpu_supports("fma");
    INFO("kernel " << kernel);
    CHECK(kernel == (fast_capable ? "x86-64-v3" : "baseline"));
#else
    CHECK(kernel == "baseline");  // other processors, and clang builds: the baseline step alone
#endif
}
