// Reading a feed mapping's rules file into MappingRules: every key checked, every pointer
// parsed, every problem one line naming the file and the rule.
#include <fmt/format.h>

#include <cmath>

#include "feed_mapping_rules.hpp"
#include "json_fields.hpp"
#include "liveprob/protocol/feed_mapping.hpp"
#include "liveprob/protocol/json_writer.hpp"
#include "liveprob/protocol/whole_file.hpp"

namespace liveprob::protocol {

namespace detail {

std::optional<std::string> render_scalar(simdjson::dom::element value) {
    std::string out;
    JsonWriter json(out);
    switch (value.type()) {
        case simdjson::dom::element_type::STRING: json.value(std::string_view(value)); break;
        case simdjson::dom::element_type::INT64: json.value(std::int64_t(value)); break;
        case simdjson::dom::element_type::UINT64: json.value(std::uint64_t(value)); break;
        case simdjson::dom::element_type::DOUBLE: json.value(double(value)); break;
        case simdjson::dom::element_type::BOOL: json.value(bool(value)); break;
        case simdjson::dom::element_type::NULL_VALUE: json.null(); break;
        default: return std::nullopt;
    }
    return out;
}

std::optional<std::string> lookup_text(simdjson::dom::element value) {
    if (value.is_string()) return std::string(std::string_view(value));
    return render_scalar(value);
}

}  // namespace detail

namespace {

using detail::Cast;
using detail::ClockForm;
using detail::FieldError;
using detail::FieldRules;
using detail::JsonFields;
using detail::KindRule;
using detail::MappingRules;
using detail::ValueRule;

// Native header fields every mapped line needs (json_feed.hpp); "type" comes from the kind.
constexpr std::string_view kHeader[] = {"match", "seq", "time_us", "period", "clock"};
// Native kinds (protocol/README.md, "Inbound messages").
const std::vector<std::string_view> kNativeKinds{
    "setup",          "period_start",   "period_end",
    "goal",           "goal_cancelled", "red_card",
    "card_rescinded", "stoppage",       "score_correction",
    "shootout_kick",  "shot_xg",        "abandoned",
    "final_whistle",  "clock"};
const std::vector<std::string_view> kClockForms{"minutes_seconds", "minute_plus", "seconds",
                                                "milliseconds"};
const std::vector<std::string_view> kCasts{"number", "text"};

JsonPointer pointer(const JsonFields& f, std::string_view name) {
    const std::string text = f.text(name);
    try {
        return JsonPointer::parse(text);
    } catch (const JsonPointerError& e) {
        f.fail(name, e.what());
    }
}

// A member known to be there (JsonFields checked it).
simdjson::dom::element member(simdjson::dom::object object, std::string_view name) {
    simdjson::dom::element e;
    if (object.at_key(name).get(e) != simdjson::SUCCESS)
        throw FieldError{std::string(name), "missing"};
    return e;
}

// A member known to be an object (JsonFields::object checked it).
simdjson::dom::object object_member(simdjson::dom::object object, std::string_view name) {
    simdjson::dom::object o;
    if (member(object, name).get_object().get(o) != simdjson::SUCCESS)
        throw FieldError{std::string(name), "expected an object"};
    return o;
}

std::string rendered(const JsonFields& f, simdjson::dom::object object, std::string_view name) {
    const auto text = detail::render_scalar(member(object, name));
    if (!text) f.fail(name, "expected a single value (string, number, true, false or null)");
    return *text;
}

// A value rule: a pointer string, or an object.
ValueRule value_rule(simdjson::dom::element e, const std::string& where) {
    ValueRule rule;
    if (e.is_string()) {
        try {
            rule.from = JsonPointer::parse(std::string_view(e));
        } catch (const JsonPointerError& err) {
            throw FieldError{where, err.what()};
        }
        return rule;
    }
    if (!e.is_object())
        throw FieldError{where, "expected a JSON pointer string or an object of options"};
    const simdjson::dom::object object(e);
    const JsonFields f(object, where + ".");
    f.only({}, {"from", "value", "as", "values", "clock", "scale", "team", "optional", "default"},
           "a field's rule");
    if (f.has("from") == f.has("value")) f.fail("from", "give exactly one of 'from' and 'value'");
    if (f.has("from")) rule.from = pointer(f, "from");
    if (f.has("value")) rule.constant = rendered(f, object, "value");
    if (f.has("as")) rule.cast = f.choice("as", kCasts) == 0 ? Cast::number : Cast::text;
    int transforms = 0;
    if (f.has("values")) {
        ++transforms;
        const JsonFields table = f.object("values");
        const simdjson::dom::object values = object_member(object, "values");
        for (const auto [key, value] : values) {
            const auto text = detail::render_scalar(value);
            if (!text) table.fail(key, "expected a single value");
            rule.values.emplace(std::string(key), *text);
        }
        if (rule.values.empty()) f.fail("values", "an empty table maps nothing");
    }
    if (f.has("clock")) {
        ++transforms;
        rule.clock = static_cast<ClockForm>(1 + f.choice("clock", kClockForms));
    }
    if (f.has("scale")) {
        ++transforms;
        rule.scale = f.number("scale");
        if (!std::isfinite(*rule.scale) || *rule.scale == 0.0)
            f.fail("scale", "must be a finite number other than 0");
    }
    if (f.has("team")) {
        rule.team = f.boolean("team");
        transforms += rule.team ? 1 : 0;
    }
    if (transforms > 1) f.fail("", "at most one of 'values', 'clock', 'scale' and 'team'");
    rule.optional = f.boolean_or("optional", false);
    if (f.has("default")) rule.fallback = rendered(f, object, "default");
    if (rule.constant && (rule.optional || rule.fallback))
        f.fail("value", "a constant is never missing: 'optional' and 'default' need 'from'");
    return rule;
}

FieldRules field_rules(simdjson::dom::object object, const std::string& where) {
    FieldRules rules;
    for (const auto [key, value] : object) {
        const std::string name(key);
        if (name == "type")
            throw FieldError{where + ".type", "the kind's 'type' is set by its rule, not mapped"};
        rules.emplace_back(name, value_rule(value, where + "." + name));
    }
    return rules;
}

KindRule kind_rule(const JsonFields& kinds, simdjson::dom::element e, const std::string& key) {
    const std::string where = "kinds." + key;
    if (!e.is_object()) kinds.fail(key, "expected an object");
    const simdjson::dom::object object(e);
    const JsonFields f(object, where + ".");
    f.only({}, {"type", "skip", "fields", "teams"}, "a kind's rule");
    KindRule rule;
    rule.skip = f.boolean_or("skip", false);
    if (rule.skip) {
        if (f.has("type") || f.has("fields") || f.has("teams"))
            f.fail("skip", "a skipped kind has no 'type', 'fields' or 'teams'");
        return rule;
    }
    rule.type = std::string(kNativeKinds[f.choice("type", kNativeKinds)]);
    if (f.has("fields")) {
        f.object("fields");  // an object, or a clear error
        rule.fields = field_rules(object_member(object, "fields"), where + ".fields");
    }
    if (f.has("teams")) {
        if (rule.type != "setup") f.fail("teams", "only a 'setup' rule names the teams");
        const JsonFields teams = f.object("teams");
        teams.only({}, {"home", "away"}, "'teams'");
        rule.home_team = pointer(teams, "home");
        rule.away_team = pointer(teams, "away");
    }
    return rule;
}

MappingRules read_rules(simdjson::dom::object top) {
    const JsonFields f(top, "");
    f.only({}, {"name", "description", "header", "kind", "kinds"}, "a feed mapping");
    MappingRules rules;
    rules.name = f.text("name");
    (void)f.text_or("description", "");
    const JsonFields header = f.object("header");
    header.only(kHeader, {}, "'header'");
    rules.header = field_rules(object_member(top, "header"), "header");
    for (const std::string_view name : kHeader) {
        if (!header.has(name)) header.fail(name, "required but missing");
    }
    if (!f.has("kind")) f.fail("kind", "required but missing");
    rules.kind = value_rule(member(top, "kind"), "kind");
    const JsonFields kinds = f.object("kinds");
    for (const auto [key, value] : object_member(top, "kinds"))
        rules.kinds.emplace(std::string(key), kind_rule(kinds, value, std::string(key)));
    if (rules.kinds.empty()) kinds.fail("", "no kinds: the rules would map nothing");
    return rules;
}

}  // namespace

FeedMapping FeedMapping::from_text(std::string_view json, std::string_view source) {
    simdjson::dom::parser parser;
    simdjson::dom::element doc;
    if (const auto err = parser.parse(json.data(), json.size()).get(doc); err) {
        throw FeedMappingError(
            fmt::format("{}: not valid JSON ({})", source, simdjson::error_message(err)));
    }
    simdjson::dom::object top;
    if (doc.get_object().get(top) != simdjson::SUCCESS)
        throw FeedMappingError(fmt::format("{}: expected one JSON object", source));
    try {
        FeedMapping mapping;
        mapping.rules_ = std::make_shared<const MappingRules>(read_rules(top));
        return mapping;
    } catch (const FieldError& e) {
        std::string field = e.field;
        if (!field.empty() && field.back() == '.') field.pop_back();
        throw FeedMappingError(fmt::format("{}: rule '{}': {}", source, field, e.reason));
    }
}

FeedMapping FeedMapping::from_file(const std::filesystem::path& path) {
    return from_text(read_whole_file(path, "the feed mapping"), path.string());
}

const std::string& FeedMapping::name() const noexcept { return rules_->name; }

}  // namespace liveprob::protocol
