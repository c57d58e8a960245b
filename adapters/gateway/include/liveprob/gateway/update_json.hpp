// One published update as the gateway's JSON frame: the one JSON form of an update
// (protocol/README.md, "The JSON form of an update") with the gateway's receive time. A frame is
// rendered once per update and shared by every client.
#pragma once

#include <cstdint>
#include <string>

#include "liveprob/core/outputs.hpp"
#include "liveprob/protocol/update_codec.hpp"

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
    bool feed_stale = false;         // the match's feed silent past serve's threshold during play
    bool journal_failing = false;    // serve's journal writes failing: may be behind the feed
    protocol::MatchDetails details;  // names, competition, format (schema 1.2)
    std::uint32_t compute_ns = 0;
};

// {"kind":"update","match_id":7,...}
std::string render_update_json(const GatewayUpdate& update);

}  // namespace liveprob::gateway
