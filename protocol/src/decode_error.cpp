#include "liveprob/protocol/decode_error.hpp"

namespace liveprob::protocol {

const char* decode_error_name(DecodeError e) noexcept {
    switch (e) {
        case DecodeError::none: return "none";
        case DecodeError::too_small: return "too_small";
        case DecodeError::oversize: return "oversize";
        case DecodeError::wrong_identifier: return "wrong_identifier";
        case DecodeError::malformed: return "malformed";
        case DecodeError::wrong_schema_version: return "wrong_schema_version";
        case DecodeError::missing_field: return "missing_field";
        case DecodeError::bad_value: return "bad_value";
    }
    return "unknown";
}

}  // namespace liveprob::protocol
