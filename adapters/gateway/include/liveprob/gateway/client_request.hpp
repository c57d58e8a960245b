// What a WebSocket client may ask of the gateway: which matches to receive.
//   {"watch":[7,12]}   {"watch":"all"}   {"unwatch":[7]}   {"unwatch":"all"}
#pragma once

#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>
#include <variant>
#include <vector>

namespace liveprob::gateway {

inline constexpr std::size_t kMaxIdsPerRequest = 1000;

struct WatchRequest {
    bool watch = true;  // false: unwatch
    bool all = false;   // every match, present and future
    std::vector<std::uint64_t> match_ids;
};

struct RequestError {
    std::string reason;  // one line, sent back to the client
};

std::variant<WatchRequest, RequestError> parse_client_request(std::string_view text);

}  // namespace liveprob::gateway
