// One published update as the gateway's JSON frame (field names: protocol/README.md, section
// "WebSocket and HTTP"). A frame is rendered once per update and shared by every client.
#pragma once

#include <cstdint>
#include <string>

#include "liveprob/core/outputs.hpp"

namespace liveprob::gateway {

// What the gateway keeps of one decoded Update buffer.
struct GatewayUpdate {
    std::uint64_t match_id = 0;
    std::uint64_t output_seq = 0;         // per match, +1 per published update
    std::uint64_t input_seq = 0;          // feed sequence number the update reflects
    std::int64_t engine_receive_us = 0;   // when the engine got that input (0 for clock ticks)
    std::int64_t engine_publish_us = 0;   // when the engine published the update
    std::int64_t gateway_receive_us = 0;  // when the gateway read it off the feed
    core::Outputs outputs;
    bool feed_stale = false;       // the match's feed silent past serve's threshold during play
    bool journal_failing = false;  // serve's journal writes failing: may be behind the feed
};

// {"kind":"update","match_id":7,...}: numbers are printed in their shortest form that reads
// back to the same double, so a client sees exactly what the engine published.
std::string render_update_json(const GatewayUpdate& update);

}  // namespace liveprob::gateway
