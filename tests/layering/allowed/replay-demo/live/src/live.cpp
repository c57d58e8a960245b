// Fixture for the layering check (never compiled): what the table allows passes.
#include <thread>
#include <zmq.hpp>

#include "liveprob/backtest/backtest.hpp"
#include "liveprob/clients/shard_sender.hpp"
#include "liveprob/live/live_replay.hpp"
