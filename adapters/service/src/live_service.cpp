#include "liveprob/service/live_service.hpp"

#include <fmt/format.h>
#include <spdlog/spdlog.h>
#include <boost/asio/signal_set.hpp>
#include <boost/asio/steady_timer.hpp>

#include <chrono>
#include <csignal>
#include <filesystem>
#include <optional>

#include "liveprob/files/endpoints_file.hpp"
#include "liveprob/files/final_state_file.hpp"
#include "liveprob/files/journal.hpp"
#include "liveprob/protocol/ingest_ack_codec.hpp"
#include "liveprob/service/host_clock.hpp"
#include "liveprob/service/journal_record_log.hpp"
#include "liveprob/service/service_core.hpp"
#include "liveprob/transport/curve_keys.hpp"
#include "liveprob/transport/message_parts.hpp"
#include "liveprob/transport/reactor_socket.hpp"
#include "liveprob/transport/topics.hpp"
#include "liveprob/transport/zap_authenticator.hpp"
#include "service_health.hpp"

namespace liveprob::service {

namespace {

using SteadyClock = std::chrono::steady_clock;

// Messages drained from one socket per turn of the loop, so ticks and snapshots stay timely
// under a flood.
constexpr int kDrainBatch = 512;
// Largest inbound message ZeroMQ accepts at all (bigger: the peer is disconnected). Buffers
// between the decoder's own limit and this are received, counted as oversize and dropped.
constexpr std::int64_t kMaxIngestMessageBytes = 1 << 20;
// At shutdown, what the ingest socket already holds is drained, journaled and acknowledged for
// at most this long (a feed that keeps sending must not hold the exit up for ever).
constexpr auto kShutdownDrain = std::chrono::seconds(2);
// How long closing waits for the last acknowledgements to leave.
constexpr int kIngestLingerMs = 2000;

void make_curve_server(zmq::socket_t& socket, const std::string& secret_z85, const char* domain) {
    socket.set(zmq::sockopt::zap_domain, domain);
    socket.set(zmq::sockopt::curve_server, 1);
    socket.set(zmq::sockopt::curve_secretkey, secret_z85);
}

std::span<const std::uint8_t> bytes_of(const zmq::message_t& m) {
    return {m.data<std::uint8_t>(), m.size()};
}

}  // namespace

// The shell around the service core: sockets, timers and signals on one Asio loop. It hands the
// core what arrives and carries out what the core asks (ServiceActions); the rules are the
// core's (service_core.hpp).
struct LiveService::Impl final : ServiceActions {
    Impl(const ServiceConfig& config, const core::ModelParams& params, ConfigSource reread);

    void start();
    void stop(const char* why);
    void wait_for_reload();
    void reload();

    void drain_ingest(zmq::socket_t& socket);
    void drain_before_exit();
    void answer_snapshots(zmq::socket_t& socket);
    void publish_counters();
    void note_curve_counters();  // the ZAP handler's figures, into the core's counters

    // ServiceActions: what the core asks for, on the sockets. None of them blocks: PUB drops
    // past a subscriber's high-water mark, and ROUTER drops acknowledgements to a feed that has
    // gone or stopped reading (it resends what it never heard about).
    void publish_update(const protocol::UpdateMeta& meta,
                        std::span<const std::uint8_t> update) override;
    void publish_counters(std::span<const std::uint8_t> counters) override;
    void acknowledge(std::string_view peer, std::span<const std::uint8_t> ack) override;

    // Timers.
    void schedule_tick();
    void schedule_counters();
    void schedule_journal_sync();

    ServiceConfig config;
    boost::asio::io_context io;
    zmq::context_t context{1};
    std::unique_ptr<transport::ZapAuthenticator> zap;
    std::optional<transport::ReactorSocket> ingest;
    zmq::socket_t publisher;
    std::optional<transport::ReactorSocket> snapshot;
    std::unique_ptr<files::Journal> journal;
    std::unique_ptr<JournalRecordLog> record_log;
    std::unique_ptr<files::FinalStateFile> final_state_file;
    std::unique_ptr<JournalFinalStates> final_states;
    HostClock clock;
    std::unique_ptr<ServiceCore> core;
    std::vector<zmq::message_t> request_frames;
    std::vector<zmq::message_t> ingest_frames;
    boost::asio::steady_timer tick_timer{io};
    boost::asio::steady_timer counters_timer{io};
    boost::asio::steady_timer sync_timer{io};
    boost::asio::signal_set signals{io, SIGINT, SIGTERM, SIGQUIT};
    boost::asio::signal_set reload_signals{io, SIGHUP};
    ConfigSource reread;
    bool stopping = false;

    // Operations (opt-in): health and metrics over HTTP.
    std::optional<monitoring::HealthListener> health_listener;
    ServiceHealth health;
    monitoring::LatencyHistogram event_to_publish;
};

LiveService::Impl::Impl(const ServiceConfig& cfg, const core::ModelParams& params,
                        ConfigSource reread_config)
    : config(cfg), publisher(context, zmq::socket_type::pub), reread(std::move(reread_config)) {
    validate_service_config(config);
    std::string secret;
    if (config.curve_enabled()) {
        secret = transport::read_key_file(config.curve_secret_key_file);
        // The ZAP handler must be bound before any CURVE server socket exists.
        zap = std::make_unique<transport::ZapAuthenticator>(
            io, context, transport::read_allow_list(config.curve_allowed_keys_file));
    }

    if (!config.journal_path.empty()) {
        // Opened (and locked) before it is read, so a second serve on it refuses to start.
        journal = std::make_unique<files::Journal>(
            config.journal_path, config.journal_sync,
            std::chrono::milliseconds(config.journal_sync_interval_ms),
            std::uint64_t{config.journal_segment_kib} * 1024);
        record_log = std::make_unique<JournalRecordLog>(*journal);
        // Retired matches' final updates, beside the segments (a device gets none: nothing
        // to read back, so nothing retires into it).
        if (std::filesystem::is_directory(config.journal_path)) {
            final_state_file =
                std::make_unique<files::FinalStateFile>(config.journal_path, config.journal_sync);
            final_states = std::make_unique<JournalFinalStates>(*final_state_file);
            if (final_state_file->damaged_records() > 0 || final_state_file->torn_bytes() > 0) {
                spdlog::warn("{}: {} damaged record(s) skipped, a torn tail of {} bytes cut",
                             final_state_file->path().string(), final_state_file->damaged_records(),
                             final_state_file->torn_bytes());
            }
            spdlog::info("{}: final updates of {} retired matches",
                         final_state_file->path().string(), final_state_file->matches());
        }
    }
    core = std::make_unique<ServiceCore>(params, core_settings(config), clock, *this,
                                         record_log.get(), final_states.get());
    if (journal) {
        const files::JournalReplayReport report = journal->replay(
            [this](std::span<const std::uint8_t> record) { core->restore(record); });
        ServiceCounters& counters = core->counters();
        counters.journal_replayed = report.frames;
        counters.journal_torn_bytes = report.torn_bytes;
        counters.journal_damaged_records = report.damaged_records;
        counters.journal_damaged_bytes = report.damaged_bytes;
        for (const auto& note : report.notes)
            spdlog::warn("journal {}: {}", config.journal_path, note);
        if (report.damaged_records > 0) {
            spdlog::warn(
                "journal {}: {} damaged record(s), {} bytes, skipped and kept on disk; "
                "every readable record after them replayed",
                config.journal_path, report.damaged_records, report.damaged_bytes);
        }
        spdlog::info("journal {}: replayed {} records from {} segment(s) into {} matches",
                     config.journal_path, report.frames, report.segments,
                     core->registry().matches().size());
    }

    // ROUTER: each feed connection has a routing id, so acknowledgements go back to the feed
    // that sent the messages. Feeds connect a DEALER.
    zmq::socket_t pull(context, zmq::socket_type::router);
    pull.set(zmq::sockopt::rcvhwm, config.ingest_high_water_mark);
    pull.set(zmq::sockopt::sndhwm, 10000);  // acknowledgements to a feed that does not read them
    pull.set(zmq::sockopt::maxmsgsize, kMaxIngestMessageBytes);
    pull.set(zmq::sockopt::linger, kIngestLingerMs);
    if (config.curve_enabled()) make_curve_server(pull, secret, transport::kIngestZapDomain);
    pull.bind(config.ingest_endpoint);

    publisher.set(zmq::sockopt::sndhwm, config.publish_high_water_mark);
    publisher.set(zmq::sockopt::linger, 200);
    zmq::socket_t router(context, zmq::socket_type::router);
    router.set(zmq::sockopt::sndhwm, 1000);
    router.set(zmq::sockopt::maxmsgsize, std::int64_t{4096});
    router.set(zmq::sockopt::linger, 0);
    if (config.curve_publish) {
        make_curve_server(publisher, secret, transport::kPublishZapDomain);
        make_curve_server(router, secret, transport::kPublishZapDomain);
    }
    publisher.bind(config.publish_endpoint);
    router.bind(config.snapshot_endpoint);

    const std::string ingest_at = pull.get(zmq::sockopt::last_endpoint);
    const std::string publish_at = publisher.get(zmq::sockopt::last_endpoint);
    const std::string snapshot_at = router.get(zmq::sockopt::last_endpoint);
    ingest.emplace(io, std::move(pull));
    snapshot.emplace(io, std::move(router));
    std::vector<std::pair<std::string, std::string>> bound = {
        {"ingest", ingest_at}, {"publish", publish_at}, {"snapshot", snapshot_at}};
    if (!config.health_address.empty()) {
        health_listener.emplace(io, config.health_address, [this](std::string_view path) {
            note_curve_counters();
            health.journal_failing = core->journal_failing();
            return answer_service_http(path, health, core->counter_values(), event_to_publish);
        });
        const auto at = monitoring::parse_listen_address(config.health_address).address();
        bound.emplace_back(
            "health", fmt::format("{}:{}", at.is_v6() ? "[" + at.to_string() + "]" : at.to_string(),
                                  health_listener->port()));
        spdlog::info("health and metrics: http://{}/metrics", bound.back().second);
    }
    if (!config.endpoints_file.empty()) files::write_endpoints_file(config.endpoints_file, bound);
    spdlog::info("serving: ingest {} publish {} snapshot {} (CURVE {}{}), journal {}", ingest_at,
                 publish_at, snapshot_at, config.curve_enabled() ? "on" : "off",
                 config.curve_publish ? ", publish encrypted" : "",
                 config.journal_path.empty() ? "off" : config.journal_path);
}

void LiveService::Impl::start() {
    signals.async_wait([this](const boost::system::error_code& ec, int signal) {
        if (!ec) stop(signal == SIGINT ? "SIGINT" : signal == SIGTERM ? "SIGTERM" : "SIGQUIT");
    });
    wait_for_reload();
    if (zap) zap->start();
    ingest->start([this](zmq::socket_t& s) { drain_ingest(s); });
    snapshot->start([this](zmq::socket_t& s) { answer_snapshots(s); });
    // The states rebuilt from the journal, republished for subscribers already listening.
    core->finish_restore();
    health.started = true;  // from here on, event -> publish delays are this run's own
    if (health_listener) health_listener->start();
    schedule_tick();
    schedule_counters();
    if (journal && config.journal_sync == files::JournalSync::interval) schedule_journal_sync();
}

void LiveService::Impl::stop(const char* why) {
    if (stopping) return;
    stopping = true;
    health.stopping = true;
    if (health_listener) health_listener->stop();
    spdlog::info("{}: stopping", why);
    tick_timer.cancel();
    counters_timer.cancel();
    sync_timer.cancel();
    signals.cancel();
    reload_signals.cancel();
    ingest->stop();
    snapshot->stop();
    drain_before_exit();
    if (zap) zap->stop();
    note_curve_counters();
    core->finish();  // journal synced, acknowledgements sent, final counters published
    io.stop();
}

void LiveService::Impl::wait_for_reload() {
    reload_signals.async_wait([this](const boost::system::error_code& ec, int) {
        if (ec || stopping) return;
        reload();
        wait_for_reload();
    });
}

void LiveService::Impl::reload() {
    if (!reread) {
        spdlog::info("SIGHUP: no configuration to re-read");
        return;
    }
    ServiceConfig fresh;
    try {
        fresh = reread();
        validate_service_config(fresh);
    } catch (const std::exception& e) {
        spdlog::error("SIGHUP: configuration not re-read, nothing changed: {}", e.what());
        return;
    }
    if (fresh.log_level != config.log_level) {
        spdlog::info("SIGHUP: log level {} -> {}", config.log_level, fresh.log_level);
        spdlog::set_level(spdlog::level::from_str(fresh.log_level));
        config.log_level = fresh.log_level;
    }
    if (zap) {  // CURVE is on, so the (validated) configuration names an allow-list
        try {
            auto allowed = transport::read_allow_list(fresh.curve_allowed_keys_file);
            spdlog::info("SIGHUP: allow-list {} read: {} feed key(s)",
                         fresh.curve_allowed_keys_file, allowed.size());
            zap->allow(std::move(allowed));
            config.curve_allowed_keys_file = fresh.curve_allowed_keys_file;
        } catch (const std::exception& e) {
            spdlog::error("SIGHUP: allow-list {} not read, the previous one stays: {}",
                          fresh.curve_allowed_keys_file, e.what());
        }
    }
    // Everything else takes a restart: named, so an operator is not left guessing.
    for (const ConfigKey& key : config_keys()) {
        if (key.name == "log_level") continue;
        const bool changed =
            std::visit([&](auto member) { return config.*member != fresh.*member; }, key.member);
        if (changed) spdlog::warn("SIGHUP: {} changed; it takes effect at a restart", key.name);
    }
    spdlog::info("SIGHUP: reloaded; {} matches kept", core->registry().matches().size());
}

void LiveService::Impl::drain_ingest(zmq::socket_t& socket) {
    ServiceCounters& counters = core->counters();
    for (int i = 0; i < kDrainBatch; ++i) {
        // Envelope: [routing id] then [FeedMessage] (no acknowledgement wanted) or
        // [DeliveryTicket] [FeedMessage].
        zmq::message_t peer;
        if (!socket.recv(peer, zmq::recv_flags::dontwait)) break;
        ++counters.frames_received;
        ingest_frames.clear();
        bool more = peer.more();
        while (more) {
            zmq::message_t frame;
            if (!socket.recv(frame, zmq::recv_flags::dontwait)) break;
            more = frame.more();
            if (ingest_frames.size() < 3) ingest_frames.push_back(std::move(frame));
        }
        if (ingest_frames.size() == 1) {
            core->ingest(bytes_of(ingest_frames[0]));
        } else if (ingest_frames.size() == 2) {
            const auto ticket = protocol::decode_delivery_ticket(bytes_of(ingest_frames[0]));
            if (!ticket.ok()) {
                // No number to answer with: counted and dropped; the feed resends it.
                const std::uint64_t seen = ++counters.bad_ticket;
                if (seen <= 10 || seen % 1000 == 0)
                    spdlog::warn("dropped an inbound message: its delivery ticket {} ({} so far)",
                                 ticket.detail, seen);
                continue;
            }
            core->ingest(bytes_of(ingest_frames[1]),
                         Delivery{{peer.data<char>(), peer.size()}, *ticket.value});
        } else {
            ++counters.multipart_dropped;
        }
    }
    if (!stopping) core->settle_acks();
}

void LiveService::Impl::drain_before_exit() {
    // What the ingest socket already holds: journaled now, acknowledged after the final sync.
    const auto until = SteadyClock::now() + kShutdownDrain;
    zmq::socket_t& socket = ingest->socket();
    while (SteadyClock::now() < until && (socket.get(zmq::sockopt::events) & ZMQ_POLLIN) != 0) {
        drain_ingest(socket);
    }
}

void LiveService::Impl::publish_update(const protocol::UpdateMeta& meta,
                                       std::span<const std::uint8_t> update) {
    const transport::MatchTopic topic = transport::match_topic(meta.match_id);
    publisher.send(zmq::const_buffer(topic.data(), topic.size()),
                   zmq::send_flags::sndmore | zmq::send_flags::dontwait);
    publisher.send(zmq::const_buffer(update.data(), update.size()), zmq::send_flags::dontwait);
    // Updates a message caused (ticks carry no receive time), once the restored states are out.
    if (meta.receive_time_us != 0 && health.started)
        event_to_publish.observe_us(meta.publish_time_us - meta.receive_time_us);
}

void LiveService::Impl::publish_counters(std::span<const std::uint8_t> counters) {
    publisher.send(
        zmq::const_buffer(transport::kCountersTopic.data(), transport::kCountersTopic.size()),
        zmq::send_flags::sndmore | zmq::send_flags::dontwait);
    publisher.send(zmq::const_buffer(counters.data(), counters.size()), zmq::send_flags::dontwait);
}

void LiveService::Impl::acknowledge(std::string_view peer, std::span<const std::uint8_t> ack) {
    zmq::socket_t& socket = ingest->socket();
    socket.send(zmq::const_buffer(peer.data(), peer.size()),
                zmq::send_flags::sndmore | zmq::send_flags::dontwait);
    socket.send(zmq::const_buffer(ack.data(), ack.size()), zmq::send_flags::dontwait);
}

void LiveService::Impl::answer_snapshots(zmq::socket_t& socket) {
    for (int i = 0; i < kDrainBatch; ++i) {
        request_frames.clear();
        zmq::message_t frame;
        if (!socket.recv(frame, zmq::recv_flags::dontwait)) return;
        request_frames.push_back(std::move(frame));
        while (request_frames.back().more()) {
            zmq::message_t next;
            if (!socket.recv(next, zmq::recv_flags::dontwait)) break;
            request_frames.push_back(std::move(next));
        }
        // Envelope: [peer id] [empty delimiter, from REQ peers] payload.
        if (request_frames.size() < 2 || request_frames.size() > 3) {
            ++core->counters().snapshot_requests;
            ++core->counters().snapshot_bad_requests;
            continue;
        }
        const bool delimited = request_frames.size() == 3;
        // Every live match may be more than one frame holds: the reply's parts are the frames
        // of one message, each under the decoder's limit.
        const auto parts = core->answer_snapshot(bytes_of(request_frames.back()));
        socket.send(request_frames.front(), zmq::send_flags::sndmore | zmq::send_flags::dontwait);
        if (delimited)
            socket.send(zmq::const_buffer(nullptr, 0),
                        zmq::send_flags::sndmore | zmq::send_flags::dontwait);
        transport::send_parts(socket, parts);
    }
}

void LiveService::Impl::schedule_tick() {
    tick_timer.expires_after(std::chrono::milliseconds(config.tick_interval_ms));
    tick_timer.async_wait([this](const boost::system::error_code& ec) {
        if (ec || stopping) return;
        core->tick();
        schedule_tick();
    });
}

void LiveService::Impl::note_curve_counters() {
    if (!zap) return;
    core->counters().curve_accepted = zap->accepted();
    core->counters().curve_refused = zap->refused();
}

void LiveService::Impl::publish_counters() {
    note_curve_counters();
    core->publish_counters();
}

void LiveService::Impl::schedule_counters() {
    counters_timer.expires_after(std::chrono::milliseconds(config.counters_interval_ms));
    counters_timer.async_wait([this](const boost::system::error_code& ec) {
        if (ec || stopping) return;
        publish_counters();
        schedule_counters();
    });
}

void LiveService::Impl::schedule_journal_sync() {
    sync_timer.expires_after(std::chrono::milliseconds(config.journal_sync_interval_ms));
    sync_timer.async_wait([this](const boost::system::error_code& ec) {
        if (ec || stopping) return;
        core->sync_due();   // and the acknowledgements it made durable
        ingest->recheck();  // sending the acknowledgements may have swallowed an arrival
        schedule_journal_sync();
    });
}

LiveService::LiveService(const ServiceConfig& config, const core::ModelParams& params,
                         ConfigSource reread)
    : impl_(std::make_unique<Impl>(config, params, std::move(reread))) {}

LiveService::~LiveService() = default;

void LiveService::run() {
    impl_->start();
    impl_->io.run();
}

}  // namespace liveprob::service
