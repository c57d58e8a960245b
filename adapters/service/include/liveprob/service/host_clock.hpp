// The host's clocks as the service core reads them (service_ports.hpp): the steady clock and
// the wall clock in microseconds. Every shell that runs the core on real time uses this one.
#pragma once

#include "liveprob/service/service_ports.hpp"
#include "liveprob/system/wall_clock.hpp"

namespace liveprob::service {

class HostClock final : public ServiceClock {
public:
    ServiceTime now() override {
        return {std::chrono::steady_clock::now(), system::wall_clock_us()};
    }
};

}  // namespace liveprob::service
