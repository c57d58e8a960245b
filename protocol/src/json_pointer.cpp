#include "liveprob/protocol/json_pointer.hpp"

#include <fmt/format.h>

#include <charconv>

#include "json_pointer_eval.hpp"

namespace liveprob::protocol {

namespace {

// An array index as RFC 6901 section 4 allows it: "0", or digits not starting with '0'.
std::optional<std::size_t> array_index(const std::string& token) {
    if (token.empty() || (token.size() > 1 && token[0] == '0')) return std::nullopt;
    std::size_t index = 0;
    const auto [end, err] = std::from_chars(token.data(), token.data() + token.size(), index);
    if (err != std::errc{} || end != token.data() + token.size()) return std::nullopt;
    return index;
}

}  // namespace

JsonPointer JsonPointer::parse(std::string_view text) {
    JsonPointer pointer;
    pointer.text_ = std::string(text);
    if (text.empty()) return pointer;
    if (text.front() != '/') {
        throw JsonPointerError(
            fmt::format("JSON pointer \"{}\": must be empty or start with '/'", text));
    }
    std::string token;
    for (std::size_t i = 1; i <= text.size(); ++i) {
        if (i == text.size() || text[i] == '/') {
            pointer.tokens_.push_back(std::move(token));
            token.clear();
            continue;
        }
        if (text[i] != '~') {
            token += text[i];
            continue;
        }
        // Section 4: "~1" first becomes '/', then "~0" becomes '~'; one pass does both, since
        // each escape is read exactly once ("~01" is "~1", never '/').
        if (i + 1 < text.size() && (text[i + 1] == '0' || text[i + 1] == '1')) {
            token += text[i + 1] == '0' ? '~' : '/';
            ++i;
            continue;
        }
        throw JsonPointerError(
            fmt::format("JSON pointer \"{}\": '~' must be followed by '0' or '1'", text));
    }
    return pointer;
}

namespace detail {

std::optional<simdjson::dom::element> resolve(simdjson::dom::element root,
                                              const JsonPointer& pointer) {
    simdjson::dom::element at = root;
    for (const std::string& token : pointer.tokens()) {
        if (at.is_object()) {
            // Exact, byte-for-byte member names (section 4: no Unicode normalisation).
            simdjson::dom::element next;
            if (simdjson::dom::object(at).at_key(token).get(next) != simdjson::SUCCESS)
                return std::nullopt;
            at = next;
        } else if (at.is_array()) {
            const auto index = array_index(token);
            if (!index) return std::nullopt;
            simdjson::dom::element next;
            if (simdjson::dom::array(at).at(*index).get(next) != simdjson::SUCCESS)
                return std::nullopt;
            at = next;
        } else {
            return std::nullopt;
        }
    }
    return at;
}

}  // namespace detail

std::optional<std::string> evaluate_json_pointer(std::string_view document,
                                                 const JsonPointer& pointer) {
    simdjson::dom::parser parser;
    simdjson::dom::element root;
    if (parser.parse(document.data(), document.size()).get(root) != simdjson::SUCCESS)
        throw JsonPointerError("the document is not valid JSON");
    const auto found = detail::resolve(root, pointer);
    if (!found) return std::nullopt;
    return simdjson::minify(*found);
}

}  // namespace liveprob::protocol
