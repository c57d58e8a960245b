#include "json_fields.hpp"

#include <algorithm>
#include <limits>

#include <fmt/format.h>

namespace liveprob::protocol::detail {

namespace dom = simdjson::dom;

std::string shown(dom::element value) {
    std::string text = simdjson::minify(value);
    constexpr std::size_t kMax = 40;
    if (text.size() > kMax) text = text.substr(0, kMax) + "...";
    return text;
}

JsonFields::JsonFields(dom::object object, std::string prefix) : prefix_(std::move(prefix)) {
    for (dom::key_value_pair kv : object) {
        const bool repeated = std::any_of(entries_.begin(), entries_.end(),
                                          [&](const auto& e) { return e.first == kv.key; });
        if (repeated) fail(kv.key, "given more than once");
        entries_.emplace_back(kv.key, kv.value);
    }
}

std::string JsonFields::full_name(std::string_view name) const {
    return prefix_ + std::string(name);
}

void JsonFields::fail(std::string_view name, std::string reason) const {
    throw FieldError{full_name(name), std::move(reason)};
}

bool JsonFields::has(std::string_view name) const {
    return std::any_of(entries_.begin(), entries_.end(),
                       [&](const auto& e) { return e.first == name; });
}

void JsonFields::only(std::span<const std::string_view> common,
                      std::initializer_list<std::string_view> own, std::string_view context) const {
    for (const auto& [key, value] : entries_) {
        if (std::find(common.begin(), common.end(), key) == common.end() &&
            std::find(own.begin(), own.end(), key) == own.end()) {
            fail(key, fmt::format("unknown field for {}", context));
        }
    }
}

dom::element JsonFields::get(std::string_view name) const {
    for (const auto& [key, value] : entries_) {
        if (key == name) return value;
    }
    fail(name, "required but missing");
}

std::uint64_t JsonFields::u64(std::string_view name) const {
    const dom::element v = get(name);
    std::uint64_t out = 0;
    if (v.get_uint64().get(out) != simdjson::SUCCESS) {
        fail(name, fmt::format("expected a whole number of 0 or more, got {}", shown(v)));
    }
    return out;
}

std::uint16_t JsonFields::u16(std::string_view name) const {
    const dom::element v = get(name);
    std::uint64_t out = 0;
    if (v.get_uint64().get(out) != simdjson::SUCCESS ||
        out > std::numeric_limits<std::uint16_t>::max()) {
        fail(name, fmt::format("expected a whole number 0..65535, got {}", shown(v)));
    }
    return static_cast<std::uint16_t>(out);
}

std::int64_t JsonFields::i64(std::string_view name) const {
    const dom::element v = get(name);
    std::int64_t out = 0;
    if (v.get_int64().get(out) != simdjson::SUCCESS) {
        fail(name, fmt::format("expected a whole number, got {}", shown(v)));
    }
    return out;
}

double JsonFields::number(std::string_view name) const {
    const dom::element v = get(name);
    double out = 0.0;
    if (v.get_double().get(out) != simdjson::SUCCESS) {
        fail(name, fmt::format("expected a number, got {}", shown(v)));
    }
    return out;
}

bool JsonFields::boolean(std::string_view name) const {
    const dom::element v = get(name);
    bool out = false;
    if (v.get_bool().get(out) != simdjson::SUCCESS) {
        fail(name, fmt::format("expected true or false, got {}", shown(v)));
    }
    return out;
}

std::string JsonFields::text(std::string_view name) const {
    const dom::element v = get(name);
    std::string_view out;
    if (v.get_string().get(out) != simdjson::SUCCESS) {
        fail(name, fmt::format("expected a string, got {}", shown(v)));
    }
    return std::string(out);
}

JsonFields JsonFields::object(std::string_view name) const {
    const dom::element v = get(name);
    dom::object out;
    if (v.get_object().get(out) != simdjson::SUCCESS) {
        fail(name, fmt::format("expected an object, got {}", shown(v)));
    }
    return JsonFields(out, full_name(name) + ".");
}

std::uint16_t JsonFields::u16_or(std::string_view name, std::uint16_t fallback) const {
    return has(name) ? u16(name) : fallback;
}

std::int64_t JsonFields::i64_or(std::string_view name, std::int64_t fallback) const {
    return has(name) ? i64(name) : fallback;
}

bool JsonFields::boolean_or(std::string_view name, bool fallback) const {
    return has(name) ? boolean(name) : fallback;
}

std::string JsonFields::text_or(std::string_view name, std::string fallback) const {
    return has(name) ? text(name) : fallback;
}

std::size_t JsonFields::choice(std::string_view name,
                               const std::vector<std::string_view>& choices) const {
    const std::string value = text(name);
    const auto it = std::find(choices.begin(), choices.end(), value);
    if (it != choices.end()) return static_cast<std::size_t>(it - choices.begin());
    std::string expected;
    for (std::size_t i = 0; i < choices.size(); ++i) {
        expected += (i == 0 ? "" : i + 1 == choices.size() ? " or " : ", ");
        expected += fmt::format("'{}'", choices[i]);
    }
    fail(name, fmt::format("expected {}, got '{}'", expected, value));
}

}  // namespace liveprob::protocol::detail
