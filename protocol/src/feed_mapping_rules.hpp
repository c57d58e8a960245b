// The compiled form of a feed mapping's rules file (feed_mapping.hpp). Private to protocol.
#pragma once

#include <cstdint>
#include <map>
#include <optional>
#include <string>
#include <utility>
#include <vector>

#include <simdjson.h>

#include "liveprob/protocol/json_pointer.hpp"

namespace liveprob::protocol::detail {

enum class ClockForm : std::uint8_t { none, minutes_seconds, minute_plus, seconds, milliseconds };
enum class Cast : std::uint8_t { keep, number, text };

// How one native field gets its value: from the provider's field at `from` (or a constant),
// then at most one transformation.
struct ValueRule {
    std::optional<JsonPointer> from;
    std::optional<std::string> constant;        // rendered JSON, when not `from`
    Cast cast = Cast::keep;                     // applied first
    std::map<std::string, std::string> values;  // provider value's text -> rendered JSON
    ClockForm clock = ClockForm::none;          // -> "MM:SS[.mmm]"
    std::optional<double> scale;                // -> a whole number
    bool team = false;                          // a team id -> "home" / "away"
    bool optional = false;                      // missing: leave the native field out
    std::optional<std::string> fallback;        // missing: this rendered JSON instead
};

using FieldRules = std::vector<std::pair<std::string, ValueRule>>;  // native name -> rule

struct KindRule {
    std::string type;  // the native message kind
    bool skip = false;
    FieldRules fields;  // body fields, and header fields this kind reads differently
    std::optional<JsonPointer> home_team, away_team;  // a setup's team ids
};

struct MappingRules {
    std::string name;
    FieldRules header;  // match, seq, time_us, period, clock
    ValueRule kind;
    std::map<std::string, KindRule> kinds;  // by the provider's kind value
};

// A scalar JSON value rendered as JSON (strings escaped, numbers in the shortest form that
// reads back the same); nothing for an object or an array.
std::optional<std::string> render_scalar(simdjson::dom::element value);
// The text a value is looked up by in a `values` table: a string as it is, a number or
// literal as JSON writes it.
std::optional<std::string> lookup_text(simdjson::dom::element value);

}  // namespace liveprob::protocol::detail
