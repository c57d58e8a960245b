// Update encoder (allocation-free once warm) and the verifying update decoder.
#include "liveprob/protocol/update_codec.hpp"

#include "update_table.hpp"
#include "verified_root.hpp"

namespace liveprob::protocol {

namespace {
constexpr detail::EnvelopeLimits kUpdateLimits{kMaxUpdateBytes, "LPU1", 4, 4};
// Room for a full 16 x 16 grid and every other field, so the first encode already fits.
constexpr std::size_t kInitialUpdateBytes = 4096;
}  // namespace

UpdateEncoder::UpdateEncoder() : builder_(kInitialUpdateBytes) {}

std::span<const std::uint8_t> UpdateEncoder::encode(const UpdateMeta& meta,
                                                    const core::Outputs& outputs) {
    builder_.Clear();  // keeps the buffer it has grown
    builder_.Finish(detail::write_update(builder_, meta, outputs, 0), wire::UpdateIdentifier());
    return {builder_.GetBufferPointer(), builder_.GetSize()};
}

std::span<const std::uint8_t> UpdateEncoder::encode(const UpdateMeta& meta,
                                                    const core::Outputs& outputs,
                                                    const core::MatchSetup& setup) {
    builder_.Clear();
    const auto details = detail::write_details(builder_, setup);
    builder_.Finish(detail::write_update(builder_, meta, outputs, details),
                    wire::UpdateIdentifier());
    return {builder_.GetBufferPointer(), builder_.GetSize()};
}

std::span<const std::uint8_t> UpdateEncoder::encode(const UpdateMeta& meta,
                                                    const core::Outputs& outputs,
                                                    const MatchDetails& details) {
    builder_.Clear();
    flatbuffers::Offset<wire::MatchDetails> written = 0;
    if (details.known) written = detail::write_details(builder_, details);
    builder_.Finish(detail::write_update(builder_, meta, outputs, written),
                    wire::UpdateIdentifier());
    return {builder_.GetBufferPointer(), builder_.GetSize()};
}

MatchDetails details_of(const core::MatchSetup& setup) {
    return MatchDetails{true,
                        setup.home_name,
                        setup.away_name,
                        setup.competition,
                        setup.scheduled_kickoff_us,
                        setup.neutral_venue,
                        setup.format};
}

Decoded<DecodedUpdate> decode_update(std::span<const std::uint8_t> bytes) {
    const auto verified = detail::verify_root<wire::Update>(bytes, kUpdateLimits);
    Decoded<DecodedUpdate> out;
    if (!verified.root) {
        out.error = verified.error;
        out.detail = verified.detail;
        return out;
    }
    DecodedUpdate update;
    if (auto problem = detail::read_update(*verified.root, update)) {
        out.error = problem->error;
        out.detail = detail::error_detail(problem->error, problem->describe());
        return out;
    }
    out.value = update;
    return out;
}

}  // namespace liveprob::protocol
