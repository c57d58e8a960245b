// The live replay: recorded streams sent over real sockets to a running `serve` at a chosen
// speed, while a subscriber records every update the service publishes; then the model is
// scored on what the subscriber actually received.
//
// What a bucket's forecast is, live: the last update received before one showed the clock past
// the bucket's minute (or the end of play exactly at it): what a screen showed as the clock
// passed the minute. The same rule as in process (match_replay.hpp), applied to updates instead
// of messages; a stream with a message at every bucket minute (the imported streams carry a
// clock reading every five minutes) gives exactly the in-process forecasts. Between messages the
// service's timer moves the clock by its own elapsed time, which lags the match clock when the
// replay runs faster than real time; such an update shows the clock it was priced at, and
// counts where that clock falls.
//
// The outcomes (what happened) and the flat-timing baseline are computed in process from the
// same streams; the fixed-prior baseline is the kick-off forecast the subscriber received.
#pragma once

#include <chrono>
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "liveprob/backtest/backtest.hpp"
#include "liveprob/clients/snapshot_client.hpp"

namespace liveprob::live {

struct LiveReplayOptions {
    std::vector<std::string> ingest;  // serve's ingest endpoint(s), one per shard in shard order
    std::string publish;              // serve's (or the relay's) publish endpoint
    double speed = 0.0;               // times real time by the streams' source times; 0: at once
    clients::CurveClientKeys keys;    // CURVE, when serve uses it
    // for the outcomes and the baseline (serve's parameters!)
    backtest::BacktestOptions in_process;
    // How long to wait for the first update (the subscription reaching serve, the first setup
    // applied), and, after everything was sent, for the last updates.
    std::chrono::milliseconds first_update_timeout{10'000};
    std::chrono::milliseconds quiet_timeout{5'000};
    // Called about ten times a second from the calling thread: (messages sent, messages in all).
    std::function<void(std::size_t, std::size_t)> progress;
};

struct LiveReplayResult {
    // model: as received; fixed_prior: received kick-off; flat: in process
    backtest::BacktestResult scores;
    std::uint64_t messages_sent = 0;
    std::uint64_t updates_received = 0;  // on events
    std::uint64_t ticks_received = 0;    // on the service's timer
    std::uint64_t missed_updates = 0;    // gaps between a match's received output sequence numbers
    std::uint64_t undecodable = 0;       // messages that did not decode (not used)
    std::uint64_t matches_without_updates = 0;
    std::uint64_t matches_not_ended = 0;  // finished in the stream, no final update received
    double send_seconds = 0.0;            // from the first message sent to the last
    // The largest |received - in process| of any probability at any bucket of a scored match.
    double largest_difference_from_in_process = 0.0;
    std::vector<std::string> problems;  // one line each, the first few
};

// Throws std::runtime_error when no update arrives within first_update_timeout (a wrong
// endpoint, or a serve that already holds these matches).
LiveReplayResult run_live_replay(const std::vector<backtest::MatchMessages>& matches,
                                 const LiveReplayOptions& options);

}  // namespace liveprob::live
