#include "liveprob/gateway/update_json.hpp"

#include "liveprob/protocol/update_json.hpp"

namespace liveprob::gateway {

std::string render_update_json(const GatewayUpdate& update) {
    const protocol::UpdateMeta meta{.match_id = update.match_id,
                                    .output_seq = update.output_seq,
                                    .input_seq = update.input_seq,
                                    .receive_time_us = update.engine_receive_us,
                                    .publish_time_us = update.engine_publish_us,
                                    .compute_ns = update.compute_ns,
                                    .feed_stale = update.feed_stale,
                                    .journal_failing = update.journal_failing};
    std::string out;
    out.reserve(900);
    protocol::JsonWriter json(out);
    protocol::write_update_json(json, meta, update.outputs, update.details,
                                {.source = {}, .gateway_receive_us = update.gateway_receive_us});
    return out;
}

}  // namespace liveprob::gateway
