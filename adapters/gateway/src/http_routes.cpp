#include "http_routes.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <chrono>

#include "liveprob/monitoring/metrics_text.hpp"

namespace liveprob::gateway {

namespace {

const char* content_type_of(std::string_view path) {
    auto ends_with = [&](std::string_view suffix) {
        return path.size() >= suffix.size() && path.substr(path.size() - suffix.size()) == suffix;
    };
    if (ends_with(".html")) return "text/html; charset=utf-8";
    if (ends_with(".js")) return "text/javascript; charset=utf-8";
    if (ends_with(".css")) return "text/css; charset=utf-8";
    if (ends_with(".svg")) return "image/svg+xml";
    if (ends_with(".png")) return "image/png";
    if (ends_with(".json")) return "application/json";
    return "application/octet-stream";
}

HttpResponse body_response(const HttpRequest& request, std::string body, const char* type) {
    HttpResponse response{http::status::ok, request.version()};
    response.set(http::field::content_type, type);
    // The JSON endpoints change with every update; the page is small. Neither is cached.
    response.set(http::field::cache_control, "no-store");
    response.keep_alive(request.keep_alive());
    response.body() = std::move(body);
    response.prepare_payload();
    if (request.method() == http::verb::head) response.body().clear();
    return response;
}

// "match=12" out of "/api/timeline?match=12"; 0 when absent or not a number.
std::uint64_t match_query(std::string_view target) {
    const auto at = target.find("match=");
    if (at == std::string_view::npos) return 0;
    const auto digits = target.substr(at + 6);
    std::uint64_t id = 0;
    std::from_chars(digits.data(), digits.data() + digits.size(), id);
    return id;
}

}  // namespace

std::string_view target_path(std::string_view target) { return target.substr(0, target.find('?')); }

HttpResponse plain_response(const HttpRequest& request, http::status status, std::string text) {
    HttpResponse response{status, request.version()};
    response.set(http::field::content_type, "text/plain; charset=utf-8");
    response.keep_alive(request.keep_alive());
    response.body() = std::move(text) + "\n";
    response.prepare_payload();
    return response;
}

bool origin_allowed(const HttpRequest& request, const GatewayConfig& config) {
    const auto origin = request.find(http::field::origin);
    if (origin == request.end()) return true;  // not a browser
    const std::string_view value = to_std(origin->value());
    const auto host = request.find(http::field::host);
    if (host != request.end() && value == fmt::format("http://{}", to_std(host->value()))) {
        return true;  // the page we serve ourselves
    }
    return std::find(config.allowed_origins.begin(), config.allowed_origins.end(), value) !=
           config.allowed_origins.end();
}

HttpResponse answer_http(const HttpRequest& request, GatewayHub& hub) {
    ++hub.counters.http_requests;
    if (request.method() != http::verb::get && request.method() != http::verb::head) {
        auto response = plain_response(request, http::status::method_not_allowed, "GET only");
        response.set(http::field::allow, "GET, HEAD");
        return response;
    }
    const std::string_view path = target_path(to_std(request.target()));
    if (path == "/api/matches") {
        return body_response(request, hub.latest.render_state_json(), "application/json");
    }
    if (path == "/api/timeline") {
        const std::uint64_t id = match_query(to_std(request.target()));
        if (auto json = hub.latest.render_timeline_json(id)) {
            return body_response(request, std::move(*json), "application/json");
        }
        ++hub.counters.http_not_found;
        return plain_response(request, http::status::not_found, "no such match");
    }
    if (path == "/api/gateway") {
        return body_response(request,
                             hub.counters.render_json(hub.clients.size(), hub.latest.match_count()),
                             "application/json");
    }
    if (path == "/health/live")
        return body_response(request, "live\n", "text/plain; charset=utf-8");
    if (path == "/health/ready") {
        const std::string problem = hub.readiness_problem(std::chrono::steady_clock::now());
        if (problem.empty()) return body_response(request, "ready\n", "text/plain; charset=utf-8");
        auto response =
            plain_response(request, http::status::service_unavailable, "not ready: " + problem);
        response.set(http::field::cache_control, "no-store");
        if (request.method() == http::verb::head) response.body().clear();
        return response;
    }
    if (path == "/metrics") {
        return body_response(request, hub.render_metrics(), monitoring::kMetricsContentType);
    }
    if (path == kFeedPath) {
        return plain_response(request, http::status::upgrade_required,
                              "this path speaks WebSocket");
    }
    // The page: only files loaded at start are served, so no path can reach outside them.
    const std::string file = path == "/" ? "/index.html" : std::string(path);
    if (auto found = hub.static_files.find(file); found != hub.static_files.end()) {
        return body_response(request, found->second, content_type_of(file));
    }
    ++hub.counters.http_not_found;
    return plain_response(request, http::status::not_found, "not found");
}

}  // namespace liveprob::gateway
