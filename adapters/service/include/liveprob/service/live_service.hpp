// `liveprob serve`: one Boost.Asio event loop on one thread owning the ingest (ROUTER), publish
// (PUB), snapshot (ROUTER) and, with CURVE, ZAP sockets, the tick, counters and journal-sync
// timers, and the signal handler. It is the shell around the service core (service_core.hpp),
// which holds the rules. Operation, drop policy and topics: adapters/service/README.md.
#pragma once

#include <functional>
#include <memory>

#include "liveprob/core/params.hpp"
#include "liveprob/service/service_config.hpp"

namespace liveprob::service {

class LiveService {
public:
    // Reads the configuration again (serve's file and flags) for SIGHUP; throws ConfigError.
    using ConfigSource = std::function<ServiceConfig()>;

    // Opens the journal, replays it, binds every socket (throws on any failure, naming it).
    // Without `reread`, SIGHUP re-reads nothing (it is still caught: it never ends serve).
    LiveService(const ServiceConfig& config, const core::ModelParams& params,
                ConfigSource reread = {});
    ~LiveService();
    LiveService(const LiveService&) = delete;
    LiveService& operator=(const LiveService&) = delete;

    // Runs until SIGTERM, SIGINT or SIGQUIT; returns after what was received is journaled and
    // acknowledged, the journal flushed and sockets closed. SIGHUP applies a changed log level
    // and re-reads the feed-key allow-list; every match stays.
    void run();

private:
    struct Impl;
    std::unique_ptr<Impl> impl_;
};

}  // namespace liveprob::service
