#include "liveprob/gateway/client_request.hpp"

#include <simdjson.h>

namespace liveprob::gateway {

namespace {
RequestError fail(std::string reason) { return RequestError{std::move(reason)}; }
}  // namespace

std::variant<WatchRequest, RequestError> parse_client_request(std::string_view text) {
    // The DOM parser needs a padded copy; client messages are small (the gateway caps them).
    simdjson::dom::parser parser;
    simdjson::dom::element root;
    if (parser.parse(text.data(), text.size()).get(root) != simdjson::SUCCESS) {
        return fail("not JSON");
    }
    simdjson::dom::object object;
    if (root.get_object().get(object) != simdjson::SUCCESS) return fail("expected a JSON object");
    if (object.size() != 1) return fail(R"(expected exactly one key, "watch" or "unwatch")");

    const auto field = *object.begin();
    WatchRequest request;
    if (field.key == "watch") {
        request.watch = true;
    } else if (field.key == "unwatch") {
        request.watch = false;
    } else {
        return fail("unknown key \"" + std::string(field.key) +
                    R"(", expected "watch" or "unwatch")");
    }

    std::string_view word;
    if (field.value.get_string().get(word) == simdjson::SUCCESS) {
        if (word != "all") return fail(R"(a string value must be "all")");
        request.all = true;
        return request;
    }
    simdjson::dom::array ids;
    if (field.value.get_array().get(ids) != simdjson::SUCCESS) {
        return fail(R"(value must be "all" or an array of match ids)");
    }
    if (ids.size() > kMaxIdsPerRequest) return fail("too many match ids in one request");
    for (simdjson::dom::element id : ids) {
        std::uint64_t value = 0;
        if (id.get_uint64().get(value) != simdjson::SUCCESS || value == 0) {
            return fail("match ids must be positive integers");
        }
        request.match_ids.push_back(value);
    }
    return request;
}

}  // namespace liveprob::gateway
