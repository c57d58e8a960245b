#include "liveprob/system/wall_clock.hpp"

#include <chrono>

namespace liveprob::system {

std::int64_t wall_clock_us() noexcept {
    return std::chrono::duration_cast<std::chrono::microseconds>(
               std::chrono::system_clock::now().time_since_epoch())
        .count();
}

}  // namespace liveprob::system
