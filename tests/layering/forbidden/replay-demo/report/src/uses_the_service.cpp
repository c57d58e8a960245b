// Fixture for the layering check (never compiled): only replay-demo/live may use adapters.
#include "liveprob/backtest/backtest.hpp"
#include "liveprob/service/live_service.hpp"
