// Random draws that give the same numbers on every standard library: std::mt19937_64 is fully
// specified by the standard, its distributions are not, so the demo implements its own.
#pragma once

#include <cstdint>
#include <random>

namespace liveprob::demo {

class PortableRandom {
public:
    explicit PortableRandom(std::uint64_t seed) : engine_(seed) {}

    // Uniform in [0, 1) from the top 53 bits.
    double uniform() noexcept { return static_cast<double>(engine_() >> 11) * 0x1.0p-53; }
    double uniform(double low, double high) noexcept { return low + (high - low) * uniform(); }
    bool chance(double probability) noexcept { return uniform() < probability; }
    // Uniform integer in [0, n), without modulo bias (rejection of the short last stretch).
    std::uint64_t below(std::uint64_t n) noexcept;
    int between(int low, int high) noexcept;  // inclusive
    // Standard normal by the Box-Muller transform (one of the pair is used).
    double normal() noexcept;
    double normal(double mean, double sd) noexcept { return mean + sd * normal(); }
    // A seed for an independent stream (one per match, so that matches can run in any order).
    std::uint64_t fork_seed() noexcept { return engine_(); }

private:
    std::mt19937_64 engine_;
};

}  // namespace liveprob::demo
