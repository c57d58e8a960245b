// Evaluation of a parsed JSON Pointer on a simdjson DOM (private to protocol: the public header
// does not expose simdjson).
#pragma once

#include <simdjson.h>

#include <optional>

#include "liveprob/protocol/json_pointer.hpp"

namespace liveprob::protocol::detail {

// RFC 6901 section 4: each token selects an object member by exact name, or an array element
// by a decimal index without leading zeros ("-", the element after the last, selects nothing).
std::optional<simdjson::dom::element> resolve(simdjson::dom::element root,
                                              const JsonPointer& pointer);

}  // namespace liveprob::protocol::detail
