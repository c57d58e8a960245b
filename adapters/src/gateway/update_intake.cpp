#include "update_intake.hpp"

#include "liveprob/protocol/update_codec.hpp"

namespace liveprob::gateway {

Intake take_in(std::span<const std::uint8_t> payload, std::int64_t received_us) {
    Intake intake;
    auto decoded = protocol::decode_update(payload);
    if (!decoded.ok()) {
        // Another message type on the feed (the service's counters) carries another file
        // identifier; anything else that fails is a damaged update.
        const bool other_type = decoded.error == protocol::DecodeError::wrong_identifier;
        intake.kind = other_type ? Intake::Kind::other_message : Intake::Kind::rejected;
        intake.detail = decoded.detail;
        return intake;
    }
    const protocol::UpdateMeta& meta = decoded.value->meta;
    intake.kind = Intake::Kind::update;
    intake.update = GatewayUpdate{meta.match_id,        meta.output_seq,
                                  meta.input_seq,       meta.receive_time_us,
                                  meta.publish_time_us, received_us,
                                  decoded.value->outputs};
    return intake;
}

}  // namespace liveprob::gateway
