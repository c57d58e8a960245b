#include "liveprob/service/live_service.hpp"

#include <fmt/format.h>
#include <spdlog/spdlog.h>
#include <boost/asio/signal_set.hpp>
#include <boost/asio/steady_timer.hpp>

#include <algorithm>
#include <chrono>
#include <csignal>
#include <filesystem>
#include <fstream>
#include <optional>

#include "liveprob/files/endpoints_file.hpp"
#include "liveprob/files/journal.hpp"
#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/ingest_ack_codec.hpp"
#include "liveprob/protocol/sharding.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/service/match_registry.hpp"
#include "liveprob/service/service_counters.hpp"
#include "liveprob/system/wall_clock.hpp"
#include "liveprob/transport/curve_keys.hpp"
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

// What became of one inbound message, as its acknowledgement tells the feed.
enum class Intake : std::uint8_t {
    durable,        // journaled (or applied, with no journal)
    refused,        // never will be: not a valid message, or another shard's match
    not_journaled,  // the journal write failed: not applied, not acknowledged, the feed resends
};

// Acknowledgements owed to one feed connection (the ingest ROUTER's routing id).
struct OwedAcks {
    std::string peer;
    protocol::IngestAckContents ack;
};

void make_curve_server(zmq::socket_t& socket, const std::string& secret_z85, const char* domain) {
    socket.set(zmq::sockopt::zap_domain, domain);
    socket.set(zmq::sockopt::curve_server, 1);
    socket.set(zmq::sockopt::curve_secretkey, secret_z85);
}

}  // namespace

struct LiveService::Impl {
    Impl(const ServiceConfig& config, const core::ModelParams& params, ConfigSource reread);

    void start();
    void stop(const char* why);
    void wait_for_reload();
    void reload();

    // Ingest: one buffer from the socket or the journal.
    void drain_ingest(zmq::socket_t& socket);
    Intake handle_buffer(std::span<const std::uint8_t> bytes, bool from_journal);
    // Acknowledgements: owed as messages are handled, sent once the sync policy is met.
    void owe_ack(const zmq::message_t& peer, std::uint64_t ticket, Intake intake);
    void settle_acks();
    void sync_journal_if_due();
    void withhold_acks();
    void send_acks();
    void drain_before_exit();
    void replay();

    // Outbound.
    // Prices the match into `outputs` and publishes it; compute_ns runs from `started` (the
    // message's arrival, or the tick's start) to the priced figures.
    void publish(LiveMatch& m, bool tick, SteadyClock::time_point started);
    static protocol::UpdateMeta meta_of(const LiveMatch& m);
    void answer_snapshots(zmq::socket_t& socket);
    void publish_counters();
    void refresh_counters();  // the gauges counted on demand (matches, CURVE verdicts)

    // Timers.
    void schedule_tick();
    void schedule_counters();
    void schedule_journal_sync();

    ServiceConfig config;
    protocol::ShardSpec shard;
    boost::asio::io_context io;
    zmq::context_t context{1};
    std::unique_ptr<transport::ZapAuthenticator> zap;
    std::optional<transport::ReactorSocket> ingest;
    zmq::socket_t publisher;
    std::optional<transport::ReactorSocket> snapshot;
    std::unique_ptr<files::Journal> journal;
    MatchRegistry registry;
    ServiceCounters counters;
    protocol::UpdateEncoder encoder;
    core::Outputs outputs;  // one buffer for every match: a match holds no outputs of its own
    std::vector<std::uint64_t> touched;
    protocol::CounterSet counter_set;
    protocol::SnapshotReplyContents snapshot_reply;
    std::vector<zmq::message_t> request_frames;
    std::vector<zmq::message_t> ingest_frames;
    std::vector<OwedAcks> owed;  // one entry per feed with tickets since the last send
    boost::asio::steady_timer tick_timer{io};
    boost::asio::steady_timer counters_timer{io};
    boost::asio::steady_timer sync_timer{io};
    boost::asio::signal_set signals{io, SIGINT, SIGTERM, SIGQUIT};
    boost::asio::signal_set reload_signals{io, SIGHUP};
    ConfigSource reread;
    bool replaying = false;
    bool stopping = false;

    // Operations (opt-in): health and metrics over HTTP.
    std::optional<monitoring::HealthListener> health_listener;
    ServiceHealth health;
    monitoring::LatencyHistogram event_to_publish;
    CounterList metrics_counters;
};

LiveService::Impl::Impl(const ServiceConfig& cfg, const core::ModelParams& params,
                        ConfigSource reread_config)
    : config(cfg), shard(protocol::parse_shard_spec(cfg.shard)),
      publisher(context, zmq::socket_type::pub),
      registry(params,
               RegistryLimits{std::chrono::seconds(cfg.retention_s),
                              std::chrono::seconds(cfg.waiting_ttl_s), cfg.match_message_cap}),
      reread(std::move(reread_config)) {
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
        replay();
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
            refresh_counters();
            list_counters(counters, registry.totals(), metrics_counters);
            return answer_service_http(path, health, metrics_counters, event_to_publish);
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

void LiveService::Impl::replay() {
    replaying = true;
    const files::JournalReplayReport report = journal->replay(
        [this](std::span<const std::uint8_t> frame) { handle_buffer(frame, true); });
    replaying = false;
    // A rebuilt match continues its output sequence from the restart time in microseconds since
    // the Unix epoch, not from 1. The run before published fewer updates per match than
    // microseconds have passed since its own start, so the sequence only rises across restarts
    // and a subscriber that skips updates "not newer" than the last (protocol/README.md) takes
    // the restarted service's updates at once; it sees one forward jump, like a gap.
    const auto restart_seq = static_cast<std::uint64_t>(system::wall_clock_us());
    for (auto& [id, m] : registry.matches()) m.output_seq = restart_seq;
    counters.journal_replayed = report.frames;
    counters.journal_torn_bytes = report.torn_bytes;
    counters.journal_damaged_records = report.damaged_records;
    counters.journal_damaged_bytes = report.damaged_bytes;
    for (const auto& note : report.notes) spdlog::warn("journal {}: {}", config.journal_path, note);
    if (report.damaged_records > 0) {
        spdlog::warn(
            "journal {}: {} damaged record(s), {} bytes, skipped and kept on disk; "
            "every readable record after them replayed",
            config.journal_path, report.damaged_records, report.damaged_bytes);
    }
    spdlog::info("journal {}: replayed {} records from {} segment(s) into {} matches",
                 config.journal_path, report.frames, report.segments, registry.matches().size());
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
    for (auto& [id, m] : registry.matches()) publish(m, false, SteadyClock::now());
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
    if (journal) {
        try {
            journal->sync();
        } catch (const files::JournalError& e) {
            spdlog::error("{}; acknowledgements withheld", e.what());
            withhold_acks();
        }
    }
    send_acks();
    publish_counters();  // the final figures, on the topic and in the log
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
    spdlog::info("SIGHUP: reloaded; {} matches kept", registry.matches().size());
}

void LiveService::Impl::drain_ingest(zmq::socket_t& socket) {
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
        const auto bytes = [](const zmq::message_t& m) {
            return std::span<const std::uint8_t>(m.data<std::uint8_t>(), m.size());
        };
        if (ingest_frames.size() == 1) {
            handle_buffer(bytes(ingest_frames[0]), false);
        } else if (ingest_frames.size() == 2) {
            const auto ticket = protocol::decode_delivery_ticket(bytes(ingest_frames[0]));
            if (!ticket.ok()) {
                // No number to answer with: counted and dropped; the feed resends it.
                const std::uint64_t seen = ++counters.bad_ticket;
                if (seen <= 10 || seen % 1000 == 0)
                    spdlog::warn("dropped an inbound message: its delivery ticket {} ({} so far)",
                                 ticket.detail, seen);
                continue;
            }
            owe_ack(peer, *ticket.value, handle_buffer(bytes(ingest_frames[1]), false));
        } else {
            ++counters.multipart_dropped;
        }
    }
    if (!stopping) settle_acks();
}

void LiveService::Impl::owe_ack(const zmq::message_t& peer, std::uint64_t ticket, Intake intake) {
    if (intake == Intake::not_journaled) return;  // nothing promised: the feed resends
    const std::string_view id(peer.data<char>(), peer.size());
    auto it =
        std::find_if(owed.begin(), owed.end(), [&](const OwedAcks& o) { return o.peer == id; });
    if (it == owed.end()) {
        owed.push_back({std::string(id), {}});
        it = owed.end() - 1;
    }
    protocol::add_ticket(intake == Intake::durable ? it->ack.durable : it->ack.refused, ticket);
}

void LiveService::Impl::sync_journal_if_due() {
    try {
        journal->sync_if_due(SteadyClock::now());
    } catch (const files::JournalError& e) {
        // The records are written; whether they reached the disk is unknown: promise nothing
        // for them, and the feeds resend (duplicates are harmless).
        spdlog::error("{}; acknowledgements withheld", e.what());
        withhold_acks();
    }
}

void LiveService::Impl::withhold_acks() {
    for (const OwedAcks& o : owed) {
        for (const auto& r : o.ack.durable) counters.acks_withheld += r.last - r.first + 1;
    }
    owed.clear();
}

void LiveService::Impl::settle_acks() {
    if (owed.empty()) return;
    if (journal && journal->awaiting_sync()) {
        sync_journal_if_due();
        if (journal->awaiting_sync()) return;  // the sync timer sends them
    }
    send_acks();
}

void LiveService::Impl::send_acks() {
    zmq::socket_t& socket = ingest->socket();
    for (OwedAcks& o : owed) {
        // Split so that no acknowledgement holds more ranges than the decoder accepts.
        std::size_t d = 0, r = 0;
        while (d < o.ack.durable.size() || r < o.ack.refused.size()) {
            protocol::IngestAckContents part;
            const std::size_t dn = std::min(o.ack.durable.size() - d, protocol::kMaxAckRanges);
            const std::size_t rn = std::min(o.ack.refused.size() - r, protocol::kMaxAckRanges);
            part.durable.assign(o.ack.durable.begin() + static_cast<std::ptrdiff_t>(d),
                                o.ack.durable.begin() + static_cast<std::ptrdiff_t>(d + dn));
            part.refused.assign(o.ack.refused.begin() + static_cast<std::ptrdiff_t>(r),
                                o.ack.refused.begin() + static_cast<std::ptrdiff_t>(r + rn));
            d += dn;
            r += rn;
            for (const auto& x : part.durable) counters.acked_durable += x.last - x.first + 1;
            for (const auto& x : part.refused) counters.acked_refused += x.last - x.first + 1;
            const std::vector<std::uint8_t> bytes = protocol::encode_ingest_ack(part);
            // A feed that has gone, or stopped reading, loses its acknowledgements (ROUTER
            // drops them); it resends what it never heard about.
            socket.send(zmq::const_buffer(o.peer.data(), o.peer.size()),
                        zmq::send_flags::sndmore | zmq::send_flags::dontwait);
            socket.send(zmq::const_buffer(bytes.data(), bytes.size()), zmq::send_flags::dontwait);
            ++counters.acks_sent;
        }
    }
    owed.clear();
}

void LiveService::Impl::drain_before_exit() {
    // What the ingest socket already holds: journaled now, acknowledged after the final sync.
    const auto until = SteadyClock::now() + kShutdownDrain;
    zmq::socket_t& socket = ingest->socket();
    while (SteadyClock::now() < until && (socket.get(zmq::sockopt::events) & ZMQ_POLLIN) != 0) {
        drain_ingest(socket);
    }
}

Intake LiveService::Impl::handle_buffer(std::span<const std::uint8_t> bytes, bool from_journal) {
    const auto received_at = SteadyClock::now();
    const std::int64_t receive_us = system::wall_clock_us();
    protocol::FeedDecodeResult decoded = protocol::decode_feed_message(bytes);
    if (!decoded.message) {
        const auto kind = static_cast<std::size_t>(decoded.error);
        const std::uint64_t seen = ++counters.decode_rejected[kind < kDecodeErrorKinds ? kind : 0];
        if (seen <= 10 || seen % 1000 == 0) {
            spdlog::warn("dropped an inbound buffer of {} bytes{}: {} ({} so far)", bytes.size(),
                         from_journal ? " from the journal" : "", decoded.detail, seen);
        }
        return Intake::refused;
    }
    if (!protocol::owns(shard, decoded.message->header.match_id)) {
        ++counters.not_our_shard;
        return Intake::refused;
    }
    // Written before it is applied: what the engine has seen, the journal has.
    // A message that cannot be journalled (disk full) is not applied either: the state stays
    // one that a restart can rebuild. It is counted and logged; the feed's resend, or the next
    // message once space returns, goes on from there.
    if (!from_journal && journal) {
        try {
            journal->append(bytes);
        } catch (const files::JournalError& e) {
            health.journal_failing = true;
            const std::uint64_t failed = ++counters.journal_write_failed;
            if (failed <= 10 || failed % 1000 == 0)
                spdlog::error("{}; message not applied ({} so far)", e.what(), failed);
            return Intake::not_journaled;
        }
        ++counters.journal_frames;
        health.journal_failing = false;
    }
    touched.clear();
    const MessageOutcome outcome =
        registry.handle(*decoded.message, receive_us, received_at, touched);
    switch (outcome) {
        case MessageOutcome::bad_setup:
            ++counters.bad_setup;
            spdlog::warn("match {}: setup refused: {}", decoded.message->header.match_id,
                         registry.last_setup_error());
            break;
        case MessageOutcome::waiting: ++counters.waiting; break;
        case MessageOutcome::waiting_overflow: ++counters.waiting_overflow; break;
        case MessageOutcome::over_cap: ++counters.over_cap; break;
        case MessageOutcome::created:
            spdlog::info("match {}: created", decoded.message->header.match_id);
            break;
        case MessageOutcome::applied:
        case MessageOutcome::duplicate:
        case MessageOutcome::rejected: break;
    }
    for (const std::uint64_t id : touched) {
        if (LiveMatch* m = registry.find(id)) publish(*m, false, received_at);
    }
    return Intake::durable;
}

protocol::UpdateMeta LiveService::Impl::meta_of(const LiveMatch& m) {
    protocol::UpdateMeta meta;
    meta.match_id = m.match.match_id();
    meta.output_seq = m.output_seq;
    meta.input_seq = m.input_seq;
    meta.receive_time_us = m.receive_time_us;
    return meta;
}

void LiveService::Impl::publish(LiveMatch& m, bool tick, SteadyClock::time_point started) {
    if (replaying) return;  // replayed states are published once, after the replay
    m.match.price_into(outputs);
    ++m.output_seq;
    protocol::UpdateMeta meta = meta_of(m);
    if (tick) meta.receive_time_us = 0;
    meta.compute_ns = static_cast<std::uint32_t>(std::min<std::int64_t>(
        std::chrono::duration_cast<std::chrono::nanoseconds>(SteadyClock::now() - started).count(),
        0xFFFF'FFFF));
    meta.publish_time_us = system::wall_clock_us();
    const auto bytes = encoder.encode(meta, outputs);
    const transport::MatchTopic topic = transport::match_topic(meta.match_id);
    // PUB never blocks: past a subscriber's high-water mark ZeroMQ drops for that subscriber.
    publisher.send(zmq::const_buffer(topic.data(), topic.size()),
                   zmq::send_flags::sndmore | zmq::send_flags::dontwait);
    publisher.send(zmq::const_buffer(bytes.data(), bytes.size()), zmq::send_flags::dontwait);
    ++(tick ? counters.ticks_published : counters.updates_published);
    if (!tick && health.started)
        event_to_publish.observe_us(meta.publish_time_us - meta.receive_time_us);
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
        ++counters.snapshot_requests;
        // Envelope: [peer id] [empty delimiter, from REQ peers] payload.
        if (request_frames.size() < 2 || request_frames.size() > 3) {
            ++counters.snapshot_bad_requests;
            continue;
        }
        const bool delimited = request_frames.size() == 3;
        const zmq::message_t& payload = request_frames.back();
        const auto wanted =
            protocol::decode_snapshot_request({payload.data<std::uint8_t>(), payload.size()});
        snapshot_reply.updates.clear();
        snapshot_reply.error.clear();
        const auto add = [this](const LiveMatch& m) {
            m.match.price_into(outputs);
            snapshot_reply.updates.push_back({meta_of(m), outputs});
        };
        if (!wanted.ok()) {
            ++counters.snapshot_bad_requests;
            snapshot_reply.error = "bad request: " + wanted.detail;
        } else if (*wanted.value == 0) {
            for (const auto& [id, m] : registry.matches()) {
                if (m.live()) add(m);
            }
        } else if (const LiveMatch* m = registry.find(*wanted.value)) {
            add(*m);
        } else {
            snapshot_reply.error = fmt::format("unknown match {}", *wanted.value);
        }
        const std::int64_t now_us = system::wall_clock_us();
        for (auto& u : snapshot_reply.updates) u.meta.publish_time_us = now_us;
        const std::vector<std::uint8_t> reply = protocol::encode_snapshot_reply(snapshot_reply);
        socket.send(request_frames.front(), zmq::send_flags::sndmore | zmq::send_flags::dontwait);
        if (delimited)
            socket.send(zmq::const_buffer(nullptr, 0),
                        zmq::send_flags::sndmore | zmq::send_flags::dontwait);
        socket.send(zmq::const_buffer(reply.data(), reply.size()), zmq::send_flags::dontwait);
    }
}

void LiveService::Impl::schedule_tick() {
    tick_timer.expires_after(std::chrono::milliseconds(config.tick_interval_ms));
    tick_timer.async_wait([this](const boost::system::error_code& ec) {
        if (ec || stopping) return;
        for (auto& [id, m] : registry.matches()) {
            if (!m.live()) continue;
            const auto started = SteadyClock::now();
            registry.advance(m, started);
            publish(m, true, started);
        }
        // Every update handed to the publisher by now: finished matches past the retention go.
        const RetireReport retired = registry.retire(SteadyClock::now());
        counters.retired += retired.matches;
        counters.waiting_expired += retired.waiting_expired;
        schedule_tick();
    });
}

void LiveService::Impl::refresh_counters() {
    counters.matches = registry.matches().size();
    counters.live_matches = 0;
    for (const auto& [id, m] : registry.matches()) counters.live_matches += m.live() ? 1u : 0u;
    if (zap) {
        counters.curve_accepted = zap->accepted();
        counters.curve_refused = zap->refused();
    }
}

void LiveService::Impl::publish_counters() {
    refresh_counters();
    list_counters(counters, registry.totals(), counter_set.values);
    counter_set.publish_time_us = system::wall_clock_us();
    const std::vector<std::uint8_t> bytes = protocol::encode_counters(counter_set);
    publisher.send(
        zmq::const_buffer(transport::kCountersTopic.data(), transport::kCountersTopic.size()),
        zmq::send_flags::sndmore | zmq::send_flags::dontwait);
    publisher.send(zmq::const_buffer(bytes.data(), bytes.size()), zmq::send_flags::dontwait);
    std::string line;
    for (const auto& [name, value] : counter_set.values) {
        if (value != 0) line += fmt::format(" {}={}", name, value);
    }
    spdlog::info("counters:{}", line);
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
        sync_journal_if_due();
        settle_acks();      // what the sync made durable
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
