// Writing and reading one Update table, shared by the update codec and the snapshot reply
// (which nests updates). Private to the protocol library.
#pragma once

#include <optional>

#include "liveprob/protocol/message_checks.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/wire/update_generated.h"

namespace liveprob::protocol::detail {

// The details table, from a setup (the service) or from decoded details (a snapshot reply).
flatbuffers::Offset<wire::MatchDetails> write_details(flatbuffers::FlatBufferBuilder& fbb,
                                                      const core::MatchSetup& setup);
flatbuffers::Offset<wire::MatchDetails> write_details(flatbuffers::FlatBufferBuilder& fbb,
                                                      const MatchDetails& details);

// `details` may be null (0): the update then names no match.
flatbuffers::Offset<wire::Update> write_update(flatbuffers::FlatBufferBuilder& fbb,
                                               const UpdateMeta& meta, const core::Outputs& outputs,
                                               flatbuffers::Offset<wire::MatchDetails> details);

// Range checks every field (enums known, numbers finite, probabilities in [0, 1], vectors of
// the right length) and fills `out`; the problem names the field by its schema name.
std::optional<MessageProblem> read_update(const wire::Update& in, DecodedUpdate& out);

}  // namespace liveprob::protocol::detail
