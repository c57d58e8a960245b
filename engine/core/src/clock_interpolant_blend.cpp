// The interpolant's evaluation loop, alone in its file: it has a fast clone (fast_clones.hpp),
// and sanitizer builds compile such files uninstrumented.
#include <cstddef>

#include "liveprob/core/clock_interpolant.hpp"
#include "liveprob/core/fast_clones.hpp"

namespace liveprob::core {

namespace {

using Weights = std::array<double, ClockInterpolant::kNodes>;
using NodeValues = std::array<ClockInterpolant::Values, ClockInterpolant::kNodes>;

// Blocks of outputs stay in registers across all the nodes, so each node's values are read
// once and every result is written once.
LIVEPROB_FAST_CLONES
void blend(const Weights& weight, const NodeValues& values, ClockInterpolant::Values& into) {
    constexpr std::size_t kBlock = 8;
    constexpr std::size_t kValues = ClockInterpolant::kValues;
    std::size_t k = 0;
    for (; k + kBlock <= kValues; k += kBlock) {
        std::array<double, kBlock> acc{};
        for (std::size_t j = 0; j < ClockInterpolant::kNodes; ++j) {
            const double* node = values[j].data() + k;
            for (std::size_t b = 0; b < kBlock; ++b) acc[b] += weight[j] * node[b];
        }
        for (std::size_t b = 0; b < kBlock; ++b) into[k + b] = acc[b];
    }
    for (; k < kValues; ++k) {
        double acc = 0.0;
        for (std::size_t j = 0; j < ClockInterpolant::kNodes; ++j) acc += weight[j] * values[j][k];
        into[k] = acc;
    }
}

}  // namespace

void blend_nodes(const Weights& weight, const NodeValues& values,
                 ClockInterpolant::Values& into) noexcept {
    blend(weight, values, into);
}

}  // namespace liveprob::core
