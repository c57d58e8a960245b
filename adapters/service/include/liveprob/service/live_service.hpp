// `liveprob serve`: one Boost.Asio event loop on one thread owning the ingest (PULL), publish
// (PUB), snapshot (ROUTER) and, with CURVE, ZAP sockets, the tick, counters and journal-sync
// timers, and the signal handler. Operation, drop policy and topics: adapters/service/README.md.
#pragma once

#include <memory>

#include "liveprob/core/params.hpp"
#include "liveprob/service/service_config.hpp"

namespace liveprob::service {

class LiveService {
public:
    // Opens the journal, replays it, binds every socket (throws on any failure, naming it).
    LiveService(const ServiceConfig& config, const core::ModelParams& params);
    ~LiveService();
    LiveService(const LiveService&) = delete;
    LiveService& operator=(const LiveService&) = delete;

    // Runs until SIGINT or SIGTERM; returns after the journal is flushed and sockets closed.
    void run();

private:
    struct Impl;
    std::unique_ptr<Impl> impl_;
};

}  // namespace liveprob::service
