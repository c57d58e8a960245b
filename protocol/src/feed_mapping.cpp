// Applying a feed mapping to one provider line: the kind's rule picks and converts each field,
// the result is written as a native JSON line and read back by the strict JSON-lines reader.
#include "liveprob/protocol/feed_mapping.hpp"

#include <fmt/format.h>

#include <charconv>
#include <cmath>
#include <limits>
#include <unordered_map>

#include "feed_mapping_rules.hpp"
#include "json_fields.hpp"
#include "json_pointer_eval.hpp"
#include "liveprob/protocol/json_writer.hpp"

namespace liveprob::protocol {

namespace {

using detail::ClockForm;
using detail::FieldRules;
using detail::KindRule;
using detail::ValueRule;

// A mapping failure: the provider's field (or the native field) and the reason.
struct MapError {
    std::string field;
    std::string reason;
};

// One provider value once it is known to be a single value.
struct Scalar {
    enum class Kind : std::uint8_t { text, integer, unsigned_integer, real, boolean } kind{};
    std::string text;
    std::int64_t integer = 0;
    std::uint64_t unsigned_integer = 0;
    double real = 0.0;
    bool boolean = false;

    bool is_number() const noexcept {
        return kind == Kind::integer || kind == Kind::unsigned_integer || kind == Kind::real;
    }
    double as_double() const noexcept {
        return kind == Kind::integer            ? static_cast<double>(integer)
               : kind == Kind::unsigned_integer ? static_cast<double>(unsigned_integer)
                                                : real;
    }
};

std::string render(const Scalar& v) {
    std::string out;
    JsonWriter json(out);
    switch (v.kind) {
        case Scalar::Kind::text: json.value(v.text); break;
        case Scalar::Kind::integer: json.value(v.integer); break;
        case Scalar::Kind::unsigned_integer: json.value(v.unsigned_integer); break;
        case Scalar::Kind::real: json.value(v.real); break;
        case Scalar::Kind::boolean: json.value(v.boolean); break;
    }
    return out;
}

// The text a value is compared by: a string itself, anything else as JSON writes it.
std::string text_of(const Scalar& v) { return v.kind == Scalar::Kind::text ? v.text : render(v); }

std::string shown_text(std::string_view text) {
    std::string out;
    JsonWriter(out).value(text.substr(0, 60));
    return out;
}

Scalar scalar(simdjson::dom::element e, const std::string& field) {
    Scalar v;
    switch (e.type()) {
        case simdjson::dom::element_type::STRING:
            v.kind = Scalar::Kind::text;
            v.text = std::string(std::string_view(e));
            return v;
        case simdjson::dom::element_type::INT64:
            v.kind = Scalar::Kind::integer;
            v.integer = std::int64_t(e);
            return v;
        case simdjson::dom::element_type::UINT64:
            v.kind = Scalar::Kind::unsigned_integer;
            v.unsigned_integer = std::uint64_t(e);
            return v;
        case simdjson::dom::element_type::DOUBLE:
            v.kind = Scalar::Kind::real;
            v.real = double(e);
            return v;
        case simdjson::dom::element_type::BOOL:
            v.kind = Scalar::Kind::boolean;
            v.boolean = bool(e);
            return v;
        default:
            throw MapError{field, fmt::format("expected a single value, got {}", detail::shown(e))};
    }
}

// "as": "number" reads a number written as text ("100001", "4032.5"); "as": "text" writes a
// number as text.
Scalar cast(Scalar v, detail::Cast to, const std::string& field) {
    if (to == detail::Cast::text) {
        if (v.kind != Scalar::Kind::text) v = Scalar{Scalar::Kind::text, text_of(v)};
        return v;
    }
    if (to != detail::Cast::number || v.kind != Scalar::Kind::text) return v;
    const char* first = v.text.data();
    const char* last = first + v.text.size();
    Scalar n;
    if (auto [end, err] = std::from_chars(first, last, n.unsigned_integer);
        err == std::errc{} && end == last) {
        n.kind = Scalar::Kind::unsigned_integer;
        return n;
    }
    if (auto [end, err] = std::from_chars(first, last, n.integer);
        err == std::errc{} && end == last) {
        n.kind = Scalar::Kind::integer;
        return n;
    }
    if (auto [end, err] = std::from_chars(first, last, n.real);
        err == std::errc{} && end == last && std::isfinite(n.real)) {
        n.kind = Scalar::Kind::real;
        return n;
    }
    throw MapError{field,
                   fmt::format("expected a number written as text, got {}", shown_text(v.text))};
}

std::uint32_t clock_ms(const Scalar& v, ClockForm form, const std::string& field) {
    if (form == ClockForm::seconds || form == ClockForm::milliseconds) {
        if (!v.is_number())
            throw MapError{field,
                           fmt::format("expected a number of {}, got {}",
                                       form == ClockForm::seconds ? "seconds" : "milliseconds",
                                       shown_text(text_of(v)))};
        const double ms = form == ClockForm::seconds ? std::round(v.as_double() * 1000.0)
                                                     : std::round(v.as_double());
        if (!(ms >= 0.0 && ms <= 4294967295.0))
            throw MapError{field, fmt::format("clock {} out of range", text_of(v))};
        return static_cast<std::uint32_t>(ms);
    }
    const std::string_view name =
        form == ClockForm::minutes_seconds ? "minutes_seconds" : "minute_plus";
    const std::string text = text_of(v);
    if (const auto ms = parse_provider_clock(name, text)) return *ms;
    throw MapError{field,
                   fmt::format("expected a clock like {}, got {}",
                               form == ClockForm::minutes_seconds ? "\"67:12\" or \"45+1:30\""
                                                                  : "\"67\" or \"45+2\"",
                               shown_text(text))};
}

// A number times `scale`, as a whole number (exact when both are whole).
std::string scaled(const Scalar& v, double scale, const std::string& field) {
    if (!v.is_number())
        throw MapError{field,
                       fmt::format("expected a number to scale, got {}", shown_text(text_of(v)))};
    std::string out;
    JsonWriter json(out);
    const bool whole_scale = std::trunc(scale) == scale && std::fabs(scale) < 9.0e15;
    if (whole_scale && v.kind == Scalar::Kind::integer) {
        std::int64_t product = 0;
        if (!__builtin_mul_overflow(v.integer, static_cast<std::int64_t>(scale), &product)) {
            json.value(product);
            return out;
        }
    } else if (whole_scale && v.kind == Scalar::Kind::unsigned_integer && scale > 0) {
        std::uint64_t product = 0;
        if (!__builtin_mul_overflow(v.unsigned_integer, static_cast<std::uint64_t>(scale),
                                    &product)) {
            json.value(product);
            return out;
        }
    } else {
        const double product = std::round(v.as_double() * scale);
        if (std::fabs(product) < 9.0e18) {
            json.value(static_cast<std::int64_t>(product));
            return out;
        }
    }
    throw MapError{field, fmt::format("{} times {} is out of range", text_of(v), scale)};
}

struct Teams {
    std::string home, away;  // the provider's team ids, as text
};

}  // namespace

// Team ids learned from each match's setup.
struct FeedMapper::State {
    simdjson::dom::parser parser;
    JsonFeedReader reader;
    std::unordered_map<std::uint64_t, Teams> teams;
};

FeedMapper::FeedMapper(FeedMapping mapping)
    : mapping_(std::move(mapping)), state_(std::make_unique<State>()) {}
FeedMapper::~FeedMapper() = default;

namespace {

// Maps one rule against one provider object. `match` is the native match id once known.
class LineMapping {
public:
    LineMapping(simdjson::dom::element root, const std::unordered_map<std::uint64_t, Teams>& teams)
        : root_(root), teams_(teams) {}

    // The provider's value for `rule`, or nothing when it is missing and may be.
    std::optional<Scalar> fetch(const ValueRule& rule, const std::string& native) const {
        const std::string field = rule.from->text();
        const auto found = detail::resolve(root_, *rule.from);
        if (!found || found->is_null()) {
            if (rule.fallback || rule.optional) return std::nullopt;
            throw MapError{field, fmt::format("required but missing (for '{}')", native)};
        }
        return cast(scalar(*found, field), rule.cast, field);
    }

    // The rendered native value, or nothing when the native field is to be left out.
    std::optional<std::string> apply(const ValueRule& rule, const std::string& native) const {
        if (rule.constant) return rule.constant;
        const auto value = fetch(rule, native);
        if (!value) return rule.fallback;  // nothing when optional
        const std::string field = rule.from->text();
        if (!rule.values.empty()) {
            const auto it = rule.values.find(text_of(*value));
            if (it == rule.values.end())
                throw MapError{field, fmt::format("{} is not in the rules' values for '{}'",
                                                  shown_text(text_of(*value)), native)};
            return it->second;
        }
        if (rule.clock != ClockForm::none) {
            std::string out;
            JsonWriter(out).value(format_match_clock(clock_ms(*value, rule.clock, field)));
            return out;
        }
        if (rule.scale) return scaled(*value, *rule.scale, field);
        if (rule.team) return side_of(text_of(*value), field);
        return render(*value);
    }

    void set_match(std::optional<std::uint64_t> match) { match_ = match; }

private:
    std::string side_of(const std::string& team, const std::string& field) const {
        const auto it = match_ ? teams_.find(*match_) : teams_.end();
        if (it == teams_.end())
            throw MapError{field, fmt::format("team {}: no setup of this match named its teams",
                                              shown_text(team))};
        if (team == it->second.home) return "\"home\"";
        if (team == it->second.away) return "\"away\"";
        throw MapError{
            field, fmt::format("team {} is neither side of match {} ({} v {})", shown_text(team),
                               *match_, shown_text(it->second.home), shown_text(it->second.away))};
    }

    simdjson::dom::element root_;
    const std::unordered_map<std::uint64_t, Teams>& teams_;
    std::optional<std::uint64_t> match_;
};

const ValueRule* rule_for(const FieldRules& rules, std::string_view native) {
    for (const auto& [name, rule] : rules)
        if (name == native) return &rule;
    return nullptr;
}

ValueRule from_pointer(const JsonPointer& pointer) {
    ValueRule rule;
    rule.from = pointer;
    return rule;
}

std::optional<std::uint64_t> whole_number(std::string_view rendered) {
    std::uint64_t n = 0;
    const auto [end, err] = std::from_chars(rendered.data(), rendered.data() + rendered.size(), n);
    if (err != std::errc{} || end != rendered.data() + rendered.size()) return std::nullopt;
    return n;
}

// The native line: header and body fields; "a.b" names become nested objects.
std::string native_line(const std::string& type,
                        const std::vector<std::pair<std::string, std::string>>& fields) {
    std::string out;
    JsonWriter json(out);
    json.begin_object().member("type", type);
    std::vector<std::string> nested_done;
    for (std::size_t i = 0; i < fields.size(); ++i) {
        const auto& [name, value] = fields[i];
        const auto dot = name.find('.');
        if (dot == std::string::npos) {
            json.key(name).raw(value);
            continue;
        }
        const std::string outer = name.substr(0, dot);
        if (std::find(nested_done.begin(), nested_done.end(), outer) != nested_done.end()) continue;
        nested_done.push_back(outer);
        json.key(outer).begin_object();
        for (std::size_t j = i; j < fields.size(); ++j) {
            const auto& [inner_name, inner_value] = fields[j];
            if (inner_name.size() > dot && inner_name.compare(0, dot + 1, outer + ".") == 0)
                json.key(std::string_view(inner_name).substr(dot + 1)).raw(inner_value);
        }
        json.end_object();
    }
    json.end_object();
    return out;
}

}  // namespace

JsonLineResult FeedMapper::map_line(std::string_view line, std::size_t line_number) {
    JsonLineResult result;
    native_.clear();
    if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
    const auto first = line.find_first_not_of(" \t");
    if (first == std::string_view::npos || line[first] == '#') return result;

    auto refuse = [&](std::string field, std::string reason) {
        JsonLineResult refused = refused_line(line_number, std::move(field), std::move(reason));
        refused.kind_hint = result.kind_hint;
        return refused;
    };

    simdjson::dom::element root;
    if (const auto err = state_->parser.parse(line.data(), line.size()).get(root); err)
        return refuse("", fmt::format("not valid JSON ({})", simdjson::error_message(err)));
    if (!root.is_object())
        return refuse("", fmt::format("expected one JSON object, got {}", detail::shown(root)));

    const detail::MappingRules& rules = mapping_.rules();
    LineMapping mapping(root, state_->teams);
    const KindRule* kind = nullptr;
    std::vector<std::pair<std::string, std::string>> fields;
    try {
        const auto kind_value = mapping.apply(rules.kind, "type");
        const std::string kind_text =
            kind_value && kind_value->size() >= 2 && kind_value->front() == '"'
                ? kind_value->substr(1, kind_value->size() - 2)
                : kind_value.value_or("null");
        const auto it = rules.kinds.find(kind_text);
        if (it == rules.kinds.end()) {
            throw MapError{rules.kind.from ? rules.kind.from->text() : "type",
                           fmt::format("no rule for the kind {}", shown_text(kind_text))};
        }
        kind = &it->second;
        if (kind->skip) return result;
        result.kind_hint = kind->type;
        // Header rules, unless the kind reads that field its own way; then the kind's fields.
        for (const auto& [name, rule] : rules.header) {
            const ValueRule* own = rule_for(kind->fields, name);
            if (auto value = mapping.apply(own ? *own : rule, name)) {
                if (name == "match") mapping.set_match(whole_number(*value));
                fields.emplace_back(name, std::move(*value));
            }
        }
        for (const auto& [name, rule] : kind->fields) {
            if (rule_for(rules.header, name)) continue;  // done above
            if (auto value = mapping.apply(rule, name))
                fields.emplace_back(name, std::move(*value));
        }
    } catch (const MapError& e) {
        return refuse(e.field, e.reason);
    }

    native_ = native_line(kind->type, fields);
    JsonLineResult native = state_->reader.read_line(native_, line_number);
    if (native.kind == JsonLineKind::bad) {
        // Name the provider's field the native one came from.
        const ValueRule* rule = rule_for(kind->fields, native.field);
        if (!rule) rule = rule_for(rules.header, native.field);
        if (rule && rule->from) {
            return refuse(rule->from->text(),
                          fmt::format("{} (mapped to '{}')", native.reason, native.field));
        }
        if (rule) return refuse(native.field, native.reason + " (a constant in the rules)");
        if (!native.field.empty() && native.reason == "required but missing") {
            return refuse(
                native.field,
                fmt::format("required but missing: the rules for this kind do not map it"));
        }
        return refuse(native.field, native.reason);
    }
    if (native.kind == JsonLineKind::message && kind->home_team) {
        try {
            const auto home = mapping.fetch(from_pointer(*kind->home_team), "teams.home");
            const auto away = mapping.fetch(from_pointer(*kind->away_team), "teams.away");
            state_->teams[native.message->header.match_id] = Teams{text_of(*home), text_of(*away)};
        } catch (const MapError& e) {
            return refuse(e.field, e.reason);
        }
    }
    native.kind_hint = kind->type;
    return native;
}

std::optional<std::uint32_t> parse_provider_clock(std::string_view form, std::string_view text) {
    auto whole = [](std::string_view digits) -> std::optional<std::uint32_t> {
        if (digits.empty() || digits.size() > 3) return std::nullopt;
        std::uint32_t n = 0;
        const auto [end, err] = std::from_chars(digits.data(), digits.data() + digits.size(), n);
        if (err != std::errc{} || end != digits.data() + digits.size()) return std::nullopt;
        return n;
    };
    // "B+E": the regular minute B, then E of stoppage.
    const auto plus = text.find('+');
    std::uint32_t base_ms = 0;
    std::string_view rest = text;
    if (plus != std::string_view::npos) {
        const auto base = whole(text.substr(0, plus));
        if (!base) return std::nullopt;
        base_ms = *base * 60'000;
        rest = text.substr(plus + 1);
    }
    std::optional<std::uint32_t> ms;
    if (form == "minutes_seconds") {
        ms = parse_match_clock(rest);
    } else if (form == "minute_plus") {
        if (!rest.empty() && rest.back() == '\'') rest.remove_suffix(1);
        if (const auto minutes = whole(rest)) ms = *minutes * 60'000;
    }
    if (!ms) return std::nullopt;
    return base_ms + *ms;
}

}  // namespace liveprob::protocol
