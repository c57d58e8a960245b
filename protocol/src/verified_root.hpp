// The first steps every decoder takes, in order: size limit, file identifier, alignment,
// FlatBuffers Verifier (with depth and table limits), schema major version. Private to the
// protocol library (it names generated FlatBuffers types).
#pragma once

#include <cstddef>
#include <cstdint>
#include <span>
#include <string>

#include <flatbuffers/flatbuffers.h>

#include "liveprob/protocol/decode_error.hpp"
#include "liveprob/protocol/feed_codec.hpp"

namespace liveprob::protocol::detail {

struct EnvelopeLimits {
    std::size_t max_bytes;
    const char* identifier;  // four characters
    unsigned max_depth;      // nesting of tables and vectors
    unsigned max_tables;     // tables visited by the verifier
};

template <class Root>
struct VerifiedRoot {
    const Root* root = nullptr;  // set when the buffer passed every step
    DecodeError error = DecodeError::none;
    std::string detail;
};

// Checks size and identifier; on success returns bytes that are 8-byte aligned (the input
// itself, or a per-thread copy valid until the next call on this thread). FlatBuffers reads
// scalars in place, so a frame at an odd offset of a file must be copied before it is read.
DecodeError check_envelope(std::span<const std::uint8_t>& bytes, const EnvelopeLimits& limits,
                           std::string& detail);

std::string schema_version_detail(std::uint16_t major);

template <class Root>
VerifiedRoot<Root> verify_root(std::span<const std::uint8_t> bytes, const EnvelopeLimits& limits) {
    VerifiedRoot<Root> out;
    out.error = check_envelope(bytes, limits, out.detail);
    if (out.error != DecodeError::none) return out;
    flatbuffers::Verifier::Options options;
    options.max_depth = limits.max_depth;
    options.max_tables = limits.max_tables;
    flatbuffers::Verifier verifier(bytes.data(), bytes.size(), options);
    if (!verifier.VerifyBuffer<Root>(limits.identifier)) {
        out.error = DecodeError::malformed;
        out.detail = "malformed: the FlatBuffers verifier rejected the buffer";
        return out;
    }
    const Root* root = flatbuffers::GetRoot<Root>(bytes.data());
    if (root->schema_major() != kSchemaMajor) {
        out.error = DecodeError::wrong_schema_version;
        out.detail = schema_version_detail(root->schema_major());
        return out;
    }
    out.root = root;
    return out;
}

// "<error name>: <text>", the one-line form of every decoder's detail.
std::string error_detail(DecodeError error, const std::string& text);

}  // namespace liveprob::protocol::detail
