// Fixture for the layering check (never compiled): the engine may not read a clock or open a
// socket.
#include <chrono>
#include <zmq.hpp>

#include "liveprob/core/match.hpp"
