// Why a wire buffer was rejected, shared by every decoder in the protocol library. The names
// (decode_error_name) are stable: the service's counters and the documentation use them.
#pragma once

#include <cstdint>
#include <optional>
#include <string>

namespace liveprob::protocol {

enum class DecodeError : std::uint8_t {
    none = 0,
    too_small,             // shorter than a FlatBuffers header
    oversize,              // longer than the size limit
    wrong_identifier,      // not this message type's file identifier
    malformed,             // the FlatBuffers Verifier refused it
    wrong_schema_version,  // major version differs from ours
    missing_field,         // a required part is absent
    bad_value,             // a field is out of its range (unknown enum, NaN, negative, ...)
};
const char* decode_error_name(DecodeError e) noexcept;

// The outcome of decoding one buffer: a value exactly when error == none, else a one-line
// detail for logs ("bad_value: field 'side': 7 is not a side").
template <class T>
struct Decoded {
    std::optional<T> value;
    DecodeError error = DecodeError::none;
    std::string detail;

    bool ok() const noexcept { return error == DecodeError::none; }
};

}  // namespace liveprob::protocol
