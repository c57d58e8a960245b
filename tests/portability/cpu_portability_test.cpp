// The same figures on every x86-64 machine, to the last bit: the program is run natively and
// under user-mode emulation (Debian's qemu-user) of an AVX2/FMA processor and of one without
// either, so that the engine's score-chain step runs in both of its compiled versions (picked
// at load time, score_chain.cpp), and every printed probability must be byte-identical.
// The JSON prints 17 significant digits, so equal text is equal doubles.
#include <catch2/catch.hpp>

#include <string>
#include <vector>

#include "test_env.hpp"

namespace {

std::string calc(const std::string& runner, const std::string& args) {
    const auto r = liveprob::test::run_command(runner + liveprob::test::liveprob_binary().string() +
                                               " calc --json " + args + " 2>/dev/null");
    INFO(runner << "calc " << args);
    REQUIRE(r.exit_code == 0);
    REQUIRE(r.out.find("\"home\"") != std::string::npos);
    return r.out;
}

}  // namespace

TEST_CASE(
    "an emulated processor with AVX2 and FMA, one without, and this one print identical figures") {
#if !defined(__x86_64__)
    FAIL("this check is written for x86-64 hosts");
#endif
    const auto qemu = liveprob::test::run_command("command -v qemu-x86_64");
    INFO("qemu-x86_64 comes with Debian's qemu-user (tools/setup/install-deps.sh)");
    REQUIRE(qemu.exit_code == 0);
    // Positions that take every path of the model: the plain closed form, the score chain with
    // the strength mixture, red cards, extra time and the shoot-out.
    const std::vector<std::string> positions = {
        "--prior 1.4,1.1 --minute 0",
        "--prior 1.55,1.15 --minute 20 --score 1-0 --reds 0-1 --format knockout",
        "--prior 2.1,0.9 --minute 63 --score 1-1 --reds 1-0",
        "--prior 1.2,1.3 --minute 88 --score 0-0 --stoppage 4 --format knockout",
    };
    for (const std::string& p : positions) {
        const std::string native = calc("", p);
        const std::string with_fma = calc("qemu-x86_64 -cpu Haswell ", p);
        const std::string baseline = calc("qemu-x86_64 -cpu Nehalem ", p);
        INFO(p);
        CHECK(with_fma == native);
        CHECK(baseline == native);
    }
}
