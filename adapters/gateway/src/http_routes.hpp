// Private to the gateway: answers to plain HTTP requests (the page, the JSON endpoints).
#pragma once

#include <boost/beast/http.hpp>

#include <string>
#include <string_view>

#include "gateway_hub.hpp"

namespace liveprob::gateway {

namespace http = boost::beast::http;
using HttpRequest = http::request<http::string_body>;
using HttpResponse = http::response<http::string_body>;

// Beast 1.74 has its own string_view; the gateway speaks std::string_view.
inline std::string_view to_std(boost::beast::string_view text) noexcept {
    return {text.data(), text.size()};
}

// Path of the WebSocket endpoint.
inline constexpr const char* kFeedPath = "/feed";

HttpResponse answer_http(const HttpRequest& request, GatewayHub& hub);

// A plain-text error response (used for refused upgrades too).
HttpResponse plain_response(const HttpRequest& request, http::status status, std::string text);

// The target's path without its query string ("/api/timeline?match=3" -> "/api/timeline").
std::string_view target_path(std::string_view target);

// True when a WebSocket upgrade with this request's Origin header may proceed.
bool origin_allowed(const HttpRequest& request, const GatewayConfig& config);

}  // namespace liveprob::gateway
