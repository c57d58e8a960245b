// `liveprob gateway`: subscribes to a `serve` publish endpoint and serves the feed to browsers
// and other programs that cannot speak ZeroMQ: WebSocket frames of JSON per match, a static
// page, and small JSON endpoints over plain HTTP. One thread, one Asio event loop for the
// listening socket, every client and the ZeroMQ subscription.
#pragma once

#include <cstdint>
#include <memory>

#include "liveprob/gateway/gateway_config.hpp"

namespace liveprob::gateway {

class Gateway {
public:
    // Binds the listening socket, connects the subscription and loads the page; throws
    // std::runtime_error with a one-line reason when any of that fails.
    explicit Gateway(GatewayConfig config);
    ~Gateway();
    Gateway(const Gateway&) = delete;
    Gateway& operator=(const Gateway&) = delete;

    // The bound HTTP/WebSocket port (useful with listen_port = 0).
    std::uint16_t port() const noexcept;

    // Serves until stop() or SIGINT/SIGTERM (when handle_signals is true).
    void run(bool handle_signals = false);
    // Closes every client with "going away" and makes run() return. Safe from any thread.
    void stop();

private:
    struct Impl;
    std::unique_ptr<Impl> impl_;
};

}  // namespace liveprob::gateway
