// The last step of every set of published probabilities, exact or interpolated.
#pragma once

#include "liveprob/core/outputs.hpp"

namespace liveprob::core {

// Complements (1 - the rest) and differences can land a rounding error below zero, like
// -2.2e-16; a published probability is never negative, so those become 0. Anything further
// below would be a fault, and stays visible to the tests.
void settle_rounding(Outputs& out) noexcept;

}  // namespace liveprob::core
