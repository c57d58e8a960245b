#include "liveprob/demo/portable_random.hpp"

#include <cmath>
#include <limits>
#include <numbers>

namespace liveprob::demo {

std::uint64_t PortableRandom::below(std::uint64_t n) noexcept {
    if (n <= 1) return 0;
    const std::uint64_t limit =
        std::numeric_limits<std::uint64_t>::max() - std::numeric_limits<std::uint64_t>::max() % n;
    std::uint64_t draw = engine_();
    while (draw >= limit) draw = engine_();
    return draw % n;
}

int PortableRandom::between(int low, int high) noexcept {
    const auto span = static_cast<std::uint64_t>(static_cast<std::int64_t>(high) - low + 1);
    return low + static_cast<int>(below(span));
}

double PortableRandom::normal() noexcept {
    const double u1 = 1.0 - uniform();  // (0, 1]: the logarithm stays finite
    const double u2 = uniform();
    return std::sqrt(-2.0 * std::log(u1)) * std::cos(2.0 * std::numbers::pi * u2);
}

}  // namespace liveprob::demo
