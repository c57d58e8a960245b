#include "liveprob/transport/asio_warnings.hpp"

#include "liveprob/gateway/gateway.hpp"

#include <fmt/format.h>
#include <spdlog/spdlog.h>
#include <boost/asio/io_context.hpp>
#include <boost/asio/ip/tcp.hpp>
#include <boost/asio/post.hpp>
#include <boost/asio/signal_set.hpp>
#include <boost/asio/steady_timer.hpp>

#include <algorithm>
#include <chrono>
#include <fstream>
#include <optional>
#include <sstream>
#include <stdexcept>
#include <vector>

#include "gateway_hub.hpp"
#include "http_session.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/system/wall_clock.hpp"
#include "liveprob/transport/reactor_socket.hpp"
#include "liveprob/transport/topics.hpp"
#include "nats_intake.hpp"
#include "update_intake.hpp"
#include "websocket_session.hpp"

namespace liveprob::gateway {

namespace asio = boost::asio;
using asio::ip::tcp;

namespace {

// Most messages read off the feed in one turn of the loop before clients get theirs.
constexpr int kFeedBatch = 256;

std::map<std::string, std::string> load_web_dir(const std::filesystem::path& dir) {
    std::map<std::string, std::string> files;
    std::error_code ec;
    for (const auto& entry : std::filesystem::directory_iterator(dir, ec)) {
        if (!entry.is_regular_file()) continue;
        std::ifstream in(entry.path(), std::ios::binary);
        std::ostringstream text;
        text << in.rdbuf();
        if (!in) throw std::runtime_error("cannot read " + entry.path().string());
        files.emplace("/" + entry.path().filename().string(), text.str());
    }
    if (ec)
        throw std::runtime_error(
            fmt::format("cannot list page folder {}: {}", dir.string(), ec.message()));
    if (!files.count("/index.html")) {
        throw std::runtime_error("page folder " + dir.string() + " has no index.html");
    }
    return files;
}

GatewayHub make_hub(GatewayConfig config) {
    auto files = load_web_dir(config.web_dir);
    return GatewayHub(std::move(config), std::move(files));
}

}  // namespace

struct Gateway::Impl {
    explicit Impl(GatewayConfig config);

    void accept_next();
    void drain_feed(zmq::socket_t& socket);
    void take(std::span<const std::uint8_t> payload);
    void apply(const GatewayUpdate& update);
    void drain_snapshot(zmq::socket_t& socket);
    void heard_upstream();
    void upstream_alive();
    void watch_upstream();
    void keep_house();
    void shut_down();

    GatewayHub hub;  // first: sessions still queued in the io_context refer to it
    asio::io_context io{1};
    zmq::context_t zmq_context{1};
    tcp::acceptor acceptor{io};
    std::optional<transport::ReactorSocket> feed;      // serve's PUB socket, or
    std::optional<NatsIntake> nats;                    // the cluster's match subjects
    std::optional<transport::ReactorSocket> snapshot;  // DEALER to serve's snapshot socket
    asio::signal_set signals{io};
    asio::steady_timer stop_timer{io};
    asio::steady_timer upstream_timer{io};
    asio::steady_timer housekeeping_timer{io};
};

Gateway::Impl::Impl(GatewayConfig config) : hub(make_hub(std::move(config))) {
    const GatewayConfig& c = hub.config;
    if (c.feed_endpoint.empty() && c.nats_servers.empty())
        throw std::runtime_error("no feed endpoint to subscribe to");
    boost::system::error_code ec;
    const auto address = asio::ip::make_address(c.listen_address, ec);
    if (ec) throw std::runtime_error("bad listen address '" + c.listen_address + "'");
    const tcp::endpoint where{address, c.listen_port};
    acceptor.open(where.protocol(), ec);
    if (!ec) acceptor.set_option(asio::socket_base::reuse_address(true), ec);
    if (!ec) acceptor.bind(where, ec);
    if (!ec) acceptor.listen(asio::socket_base::max_listen_connections, ec);
    if (ec) {
        throw std::runtime_error(fmt::format("cannot listen on {}:{}: {}", c.listen_address,
                                             c.listen_port, ec.message()));
    }

    if (!c.nats_servers.empty()) {
        nats.emplace(c.nats_servers, io, [this](const std::vector<std::uint8_t>& payload) {
            heard_upstream();
            take(payload);
        });
        return;
    }

    zmq::socket_t subscriber(zmq_context, zmq::socket_type::sub);
    // Every match's topic, and the service's counters: they come on a timer even when no match
    // changes, so their silence tells a dead or cut-off service from a quiet one.
    subscriber.set(zmq::sockopt::subscribe, std::string(transport::kMatchTopicPrefix));
    subscriber.set(zmq::sockopt::subscribe, std::string(transport::kCountersTopic));
    subscriber.set(zmq::sockopt::linger, 0);
    try {
        subscriber.connect(c.feed_endpoint);
    } catch (const zmq::error_t& e) {
        throw std::runtime_error("cannot subscribe to " + c.feed_endpoint + ": " + e.what());
    }
    feed.emplace(io, std::move(subscriber));

    if (!c.snapshot_endpoint.empty()) {
        zmq::socket_t dealer(zmq_context, zmq::socket_type::dealer);
        dealer.set(zmq::sockopt::linger, 0);
        try {
            dealer.connect(c.snapshot_endpoint);
        } catch (const zmq::error_t& e) {
            throw std::runtime_error("cannot connect to " + c.snapshot_endpoint + ": " + e.what());
        }
        snapshot.emplace(io, std::move(dealer));
    }
}

void Gateway::Impl::accept_next() {
    acceptor.async_accept([this](boost::system::error_code ec, tcp::socket socket) {
        if (ec == asio::error::operation_aborted || !acceptor.is_open()) return;
        if (!ec) {
            socket.set_option(tcp::no_delay(true), ec);
            std::make_shared<HttpSession>(std::move(socket), hub)->start();
        } else {
            spdlog::warn("gateway: accept failed: {}", ec.message());
        }
        accept_next();
    });
}

void Gateway::Impl::drain_feed(zmq::socket_t& socket) {
    for (int i = 0; i < kFeedBatch; ++i) {
        // A published update is [topic, payload]; the payload is the last part.
        zmq::message_t part;
        if (!socket.recv(part, zmq::recv_flags::dontwait)) return;
        const bool counters = part.more() && part.to_string_view() == transport::kCountersTopic;
        while (part.more()) {
            zmq::message_t next;
            if (!socket.recv(next, zmq::recv_flags::dontwait)) break;
            part = std::move(next);
        }
        heard_upstream();
        if (counters) continue;  // a sign of life; the numbers are serve's own business
        take({static_cast<const std::uint8_t*>(part.data()), part.size()});
    }
}

void Gateway::Impl::take(std::span<const std::uint8_t> payload) {
    Intake intake = take_in(payload, system::wall_clock_us());
    if (intake.kind == Intake::Kind::rejected) {
        if (hub.counters.updates_rejected++ < 10) {
            spdlog::warn("gateway: rejected a feed message: {}", intake.detail);
        }
        return;
    }
    ++hub.counters.updates_received;
    apply(intake.update);
}

void Gateway::Impl::apply(const GatewayUpdate& update) {
    const auto accepted = hub.latest.accept(update, std::chrono::steady_clock::now());
    if (accepted.arrival == Arrival::stale) {
        ++hub.counters.updates_stale;
        return;
    }
    if (accepted.arrival == Arrival::after_gap) ++hub.counters.update_gaps;
    for (WebSocketSession* client : hub.clients)
        client->offer(update.match_id, accepted.frame, update.gateway_receive_us);
}

void Gateway::Impl::drain_snapshot(zmq::socket_t& socket) {
    // A reply for every match comes as the frames of one message, each a whole reply holding
    // some of the matches: each is applied as it is read.
    zmq::message_t reply;
    while (socket.recv(reply, zmq::recv_flags::dontwait)) {
        ++hub.counters.snapshot_parts;
        auto decoded = protocol::decode_snapshot_reply(
            {static_cast<const std::uint8_t*>(reply.data()), reply.size()});
        if (!decoded.ok() || !decoded.value->error.empty()) {
            ++hub.counters.snapshot_failures;
            spdlog::warn("gateway: snapshot failed: {}",
                         decoded.ok() ? decoded.value->error : decoded.detail);
            continue;
        }
        const std::int64_t now = system::wall_clock_us();
        for (const auto& u : decoded.value->updates) {
            apply(GatewayUpdate{u.meta.match_id, u.meta.output_seq, u.meta.input_seq,
                                u.meta.receive_time_us, u.meta.publish_time_us, now, u.outputs,
                                u.meta.feed_stale, u.meta.journal_failing, u.details,
                                u.meta.compute_ns});
        }
    }
}

void Gateway::Impl::heard_upstream() {
    ++hub.counters.upstream_messages;
    upstream_alive();
}

void Gateway::Impl::upstream_alive() {
    hub.last_upstream = std::chrono::steady_clock::now();
    if (hub.upstream == Upstream::live) return;
    if (hub.upstream == Upstream::lost)
        spdlog::info("gateway: upstream back: {}", hub.config.feed_endpoint);
    hub.upstream = Upstream::live;
    const std::string status = hub.render_upstream_json(hub.last_upstream);
    for (WebSocketSession* client : hub.clients) client->notify(status);
}

// Checks a few times per silence limit whether serve has gone quiet; on loss every client is
// told at once (the page marks every match stale) and the loss is logged.
void Gateway::Impl::watch_upstream() {
    upstream_timer.expires_after(
        std::max(hub.config.upstream_silence_limit / 4, std::chrono::milliseconds(10)));
    upstream_timer.async_wait([this](boost::system::error_code ec) {
        if (ec) return;
        // The cluster publishes no counters on NATS: a quiet cluster is told from a lost one by
        // the connection (its client reconnects to another node on its own).
        if (nats && nats->connected()) upstream_alive();
        const auto now = std::chrono::steady_clock::now();
        if (hub.upstream == Upstream::live &&
            now - hub.last_upstream > hub.config.upstream_silence_limit) {
            hub.upstream = Upstream::lost;
            ++hub.counters.upstream_losses;
            spdlog::warn("gateway: upstream lost: {}", hub.readiness_problem(now));
            const std::string status = hub.render_upstream_json(now);
            for (WebSocketSession* client : hub.clients) client->notify(status);
        }
        watch_upstream();
    });
}

// Every few moments: clients too far behind are closed, and finished matches past their
// retention are forgotten (the frames already queued for a client still go out).
void Gateway::Impl::keep_house() {
    const auto& c = hub.config;
    auto period =
        std::min(c.send_stall_limit,
                 c.finished_retention.count() > 0 ? c.finished_retention : c.send_stall_limit) /
        4;
    period = std::clamp(period, std::chrono::milliseconds(10), std::chrono::milliseconds(1000));
    housekeeping_timer.expires_after(period);
    housekeeping_timer.async_wait([this](boost::system::error_code ec) {
        if (ec) return;
        const auto now = std::chrono::steady_clock::now();
        const std::vector<WebSocketSession*> open(hub.clients.begin(), hub.clients.end());
        for (WebSocketSession* client : open) client->check_behind(now);
        if (hub.config.finished_retention.count() > 0)
            hub.counters.matches_retired +=
                hub.latest.forget_finished(now, hub.config.finished_retention);
        keep_house();
    });
}

void Gateway::Impl::shut_down() {
    if (hub.shutting_down) return;
    hub.shutting_down = true;
    boost::system::error_code ignored;
    acceptor.close(ignored);
    signals.cancel(ignored);
    upstream_timer.cancel();
    housekeeping_timer.cancel();
    if (feed) feed->stop();
    if (nats) nats->stop();
    if (snapshot) snapshot->stop();
    const std::vector<WebSocketSession*> open(hub.clients.begin(), hub.clients.end());
    for (WebSocketSession* client : open) client->close_going_away();
    // Give close frames a moment to leave, then end the loop whatever is still pending.
    stop_timer.expires_after(std::chrono::milliseconds(500));
    stop_timer.async_wait([this](boost::system::error_code) { io.stop(); });
}

Gateway::Gateway(GatewayConfig config) : impl_(std::make_unique<Impl>(std::move(config))) {}
Gateway::~Gateway() = default;

std::uint16_t Gateway::port() const noexcept { return impl_->acceptor.local_endpoint().port(); }

void Gateway::run(bool handle_signals) {
    Impl& g = *impl_;
    if (g.feed) g.feed->start([&g](zmq::socket_t& socket) { g.drain_feed(socket); });
    // Subscribed first (in the constructor), then the latest states read: an entry older than
    // an update that arrived meanwhile is skipped as stale.
    if (g.nats)
        spdlog::info("gateway: {} latest states from the cluster", g.nats->read_latest_states());
    if (g.snapshot) {
        // Subscribed first, then asked: whatever is published meanwhile is newer than the
        // snapshot's entries, which the latest updates then skip as stale.
        const auto request = protocol::encode_snapshot_request(0);
        g.snapshot->socket().send(zmq::buffer(request), zmq::send_flags::dontwait);
        ++g.hub.counters.snapshot_requests;
        g.snapshot->start([&g](zmq::socket_t& socket) { g.drain_snapshot(socket); });
    }
    g.accept_next();
    g.watch_upstream();
    g.keep_house();
    if (handle_signals) {
        g.signals.add(SIGINT);
        g.signals.add(SIGTERM);
        g.signals.async_wait([&g](boost::system::error_code ec, int) {
            if (!ec) g.shut_down();
        });
    }
    g.io.run();
}

void Gateway::stop() {
    asio::post(impl_->io, [impl = impl_.get()] { impl->shut_down(); });
}

}  // namespace liveprob::gateway
