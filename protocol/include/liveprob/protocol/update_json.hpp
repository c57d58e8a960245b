// The one JSON form of an update (protocol/README.md, "The JSON form of an update"): what
// `tap --json`, the gateway's WebSocket frames and HTTP API, and the Python client (through the
// compiled module) all print. Written here once; every number in its shortest form that reads
// back to the same double, so a reader sees exactly what the engine published.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>

#include "liveprob/protocol/json_writer.hpp"
#include "liveprob/protocol/update_codec.hpp"

namespace liveprob::protocol {

// Members only some carriers have; each is left out when unset.
struct UpdateJsonExtras {
    std::string_view source;              // "live" or "snapshot", where a reader mixes both
    std::int64_t gateway_receive_us = 0;  // when the gateway read the update off the feed
};

void write_update_json(JsonWriter& json, const UpdateMeta& meta, const core::Outputs& outputs,
                       const MatchDetails& details, const UpdateJsonExtras& extras = {});

// The same as one compact document.
std::string update_json(const DecodedUpdate& update, const UpdateJsonExtras& extras = {});

}  // namespace liveprob::protocol
