#include "update_intake.hpp"

#include "liveprob/protocol/update_codec.hpp"

namespace liveprob::gateway {

Intake take_in(std::span<const std::uint8_t> payload, std::int64_t received_us) {
    Intake intake;
    auto decoded = protocol::decode_update(payload);
    if (!decoded.ok()) {
        // Only updates travel on match topics, so whatever fails to decode is damaged.
        intake.kind = Intake::Kind::rejected;
        intake.detail = decoded.detail;
        return intake;
    }
    const protocol::UpdateMeta& meta = decoded.value->meta;
    intake.kind = Intake::Kind::update;
    intake.update = GatewayUpdate{meta.match_id,          meta.output_seq,
                                  meta.input_seq,         meta.receive_time_us,
                                  meta.publish_time_us,   received_us,
                                  decoded.value->outputs, meta.feed_stale,
                                  meta.journal_failing,   std::move(decoded.value->details),
                                  meta.compute_ns};
    return intake;
}

}  // namespace liveprob::gateway
