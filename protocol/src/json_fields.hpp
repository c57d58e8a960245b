// Typed, strict access to the fields of one JSON object (simdjson DOM). Every problem throws
// FieldError naming the field by its full dotted name, so the caller can report
// "field 'prior.home': expected a number, got \"high\"". Private to the protocol library.
#pragma once

#include <cstdint>
#include <initializer_list>
#include <optional>
#include <span>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

#include <simdjson.h>

namespace liveprob::protocol::detail {

struct FieldError {
    std::string field;
    std::string reason;
};

class JsonFields {
public:
    // `prefix` is prepended to field names in errors ("prior." for a nested object).
    JsonFields(simdjson::dom::object object, std::string prefix);

    bool has(std::string_view name) const;

    // Throws for any field in neither list (a typo must not pass silently). `context` says
    // what the fields belong to, e.g. "a 'goal' message".
    void only(std::span<const std::string_view> common, std::initializer_list<std::string_view> own,
              std::string_view context) const;

    std::uint64_t u64(std::string_view name) const;
    std::uint16_t u16(std::string_view name) const;
    std::int64_t i64(std::string_view name) const;
    double number(std::string_view name) const;
    bool boolean(std::string_view name) const;
    std::string text(std::string_view name) const;
    JsonFields object(std::string_view name) const;

    // The same, or `fallback` when the field is absent.
    std::uint16_t u16_or(std::string_view name, std::uint16_t fallback) const;
    std::int64_t i64_or(std::string_view name, std::int64_t fallback) const;
    bool boolean_or(std::string_view name, bool fallback) const;
    std::string text_or(std::string_view name, std::string fallback) const;

    // A string that must be one of `choices`; returns its index.
    std::size_t choice(std::string_view name, const std::vector<std::string_view>& choices) const;

    [[noreturn]] void fail(std::string_view name, std::string reason) const;
    std::string full_name(std::string_view name) const;

private:
    simdjson::dom::element get(std::string_view name) const;  // throws when absent
    std::vector<std::pair<std::string_view, simdjson::dom::element>> entries_;
    std::string prefix_;
};

// A short JSON rendering of a value for error messages, cut at 40 characters.
std::string shown(simdjson::dom::element value);

}  // namespace liveprob::protocol::detail
