// `liveprob gateway`: the feed for browsers and other languages (WebSocket + HTTP).
#include <fmt/format.h>
#include <spdlog/spdlog.h>

#include <filesystem>
#include <fstream>
#include <memory>
#include <string>

#include "command_registry.hpp"
#include "liveprob/cluster/cluster_layout.hpp"
#include "liveprob/files/endpoints_file.hpp"
#include "liveprob/gateway/gateway.hpp"
#include "liveprob/monitoring/log_format.hpp"
#include "liveprob/protocol/whole_file.hpp"

namespace {

using liveprob::gateway::GatewayConfig;

struct GatewayOptions {
    GatewayConfig config;
    std::string port_file;
    std::string serve_endpoints;
    std::string cluster_servers;
    std::uint64_t idle_timeout_ms = 60'000;
    std::uint64_t handshake_timeout_ms = 10'000;
    std::uint64_t upstream_silence_ms = 12'000;
    std::uint64_t send_stall_ms = 15'000;
    std::uint64_t retention_s = 600;
    std::string log_format = "text";
};

// serve's endpoints file: we want publish= and snapshot=.
void read_serve_endpoints(const std::string& path, GatewayConfig& config) {
    const auto endpoints = liveprob::files::read_endpoints_file(path);
    if (const auto it = endpoints.find("publish");
        it != endpoints.end() && config.feed_endpoint.empty())
        config.feed_endpoint = it->second;
    if (const auto it = endpoints.find("snapshot");
        it != endpoints.end() && config.snapshot_endpoint.empty())
        config.snapshot_endpoint = it->second;
    if (config.feed_endpoint.empty()) throw std::runtime_error(path + " names no publish endpoint");
}

int run_gateway(GatewayOptions& options) {
    GatewayConfig& config = options.config;
    if (!options.serve_endpoints.empty()) read_serve_endpoints(options.serve_endpoints, config);
    config.nats_servers = liveprob::cluster::split_servers(options.cluster_servers);
    if (config.feed_endpoint.empty() == config.nats_servers.empty())
        throw liveprob::cli::UsageError("give --feed or --serve-endpoints, or --cluster");
    if (config.web_dir.empty()) config.web_dir = liveprob::gateway::default_web_dir();
    if (config.send_queue_cap == 0)
        throw liveprob::cli::UsageError("--queue-cap must be at least 1");
    if (options.idle_timeout_ms == 0)
        throw liveprob::cli::UsageError("--idle-timeout-ms must be positive");
    config.idle_timeout = std::chrono::milliseconds(options.idle_timeout_ms);
    config.handshake_timeout = std::chrono::milliseconds(options.handshake_timeout_ms);
    config.upstream_silence_limit = std::chrono::milliseconds(options.upstream_silence_ms);
    config.send_stall_limit = std::chrono::milliseconds(options.send_stall_ms);
    config.finished_retention = std::chrono::seconds(options.retention_s);
    liveprob::monitoring::use_log_format(options.log_format);

    liveprob::gateway::Gateway gateway(config);
    if (!options.port_file.empty()) {
        // Replaced atomically, so a reader never sees half a number.
        liveprob::protocol::write_file_atomically(
            options.port_file, std::to_string(gateway.port()) + "\n", "the port file");
    }
    spdlog::info("gateway: http://{}:{}/ (WebSocket on /feed), subscribed to {}",
                 config.listen_address, gateway.port(), config.feed_endpoint);
    gateway.run(/*handle_signals=*/true);
    return liveprob::cli::kExitOk;
}

const liveprob::cli::Registration registration{
    {"gateway", "serve the feed to browsers and other languages over WebSocket and HTTP",
     [](CLI::App& app) {
         auto options = std::make_shared<GatewayOptions>();
         GatewayConfig& c = options->config;
         app.add_option("--feed", c.feed_endpoint, "publish endpoint of `serve` (or `relay`)");
         app.add_option("--snapshot", c.snapshot_endpoint,
                        "snapshot endpoint: ask it for every live match at start");
         app.add_option("--serve-endpoints", options->serve_endpoints,
                        "serve's endpoints file (publish= and snapshot= lines)");
         app.add_option("--cluster", options->cluster_servers,
                        "instead of serve: nats:// URLs of a NATS cluster (comma-separated); "
                        "updates from its match subjects and latest-state bucket");
         app.add_option("--address", c.listen_address, "address to listen on")
             ->capture_default_str();
         app.add_option("--port", c.listen_port, "port to listen on (0: any free port)")
             ->capture_default_str();
         app.add_option("--port-file", options->port_file,
                        "write the bound port to this file once listening");
         app.add_option("--page-dir", c.web_dir, "folder with the page (default: installed page)");
         app.add_option("--allow-origin", c.allowed_origins,
                        "browser origin allowed besides the gateway's own (repeatable)");
         app.add_option("--max-message-bytes", c.max_client_message_bytes,
                        "largest message a client may send")
             ->capture_default_str();
         app.add_option("--queue-cap", c.send_queue_cap,
                        "replies waiting for one client before it is dropped")
             ->capture_default_str();
         app.add_option("--send-stall-ms", options->send_stall_ms,
                        "drop a client whose oldest waiting frame has waited this long")
             ->check(CLI::Range(10, 3'600'000))
             ->capture_default_str();
         app.add_option("--retention-s", options->retention_s,
                        "forget a finished or abandoned match this long after its final update "
                        "(0: never; serve's retention_s)")
             ->check(CLI::Range(0, 365 * 24 * 3600))
             ->capture_default_str();
         app.add_option("--idle-timeout-ms", options->idle_timeout_ms,
                        "cut off a client silent (no pong) for this long")
             ->capture_default_str();
         app.add_option("--handshake-timeout-ms", options->handshake_timeout_ms,
                        "limit for HTTP requests, WebSocket handshakes and closes")
             ->capture_default_str();
         app.add_option("--client-send-buffer", c.client_send_buffer_bytes,
                        "kernel send buffer per client in bytes (0: system default)")
             ->capture_default_str();
         app.add_option("--timeline-points", c.timeline_points, "chart points kept per match")
             ->capture_default_str();
         app.add_option("--upstream-silence-ms", options->upstream_silence_ms,
                        "serve silent (no update, no counters) this long: every match stale, "
                        "/health/ready 503; keep above serve's --counters-ms")
             ->check(CLI::Range(10, 3'600'000))
             ->capture_default_str();
         app.add_option("--log-format", options->log_format, "text | json (JSON lines)")
             ->check(CLI::IsMember({"text", "json"}))
             ->capture_default_str();
         return [options] { return run_gateway(*options); };
     }}};

}  // namespace
