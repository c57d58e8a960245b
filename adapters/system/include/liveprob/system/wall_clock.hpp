// Wall time, the one reading of the host's clock in microseconds since the Unix epoch: the
// feed's and the service's timestamps (source_time_us, receive_time_us, publish_time_us) and
// latency measurements compare readings of it taken in different processes. The engine never
// reads a clock; the runtime passes time in.
#pragma once

#include <cstdint>

namespace liveprob::system {

std::int64_t wall_clock_us() noexcept;

}  // namespace liveprob::system
