#include "liveprob/cluster/cluster_engine.hpp"

#include <fmt/format.h>
#include <spdlog/spdlog.h>
#include <unistd.h>

#include <condition_variable>
#include <deque>
#include <map>
#include <mutex>

#include "liveprob/cluster/cluster_setup.hpp"
#include "liveprob/cluster/feed_purge_log.hpp"
#include "liveprob/cluster/nats_client.hpp"
#include "liveprob/cluster/partition_leases.hpp"
#include "liveprob/cluster/retired_matches.hpp"
#include "liveprob/service/host_clock.hpp"
#include "liveprob/service/service_core.hpp"

namespace liveprob::cluster {
namespace {

using Clock = std::chrono::steady_clock;
// The loop looks at its stop flag at least this often (a signal handler only sets the flag).
constexpr auto kLongestWait = std::chrono::milliseconds(100);
// How long an engine starting tries to find or make the stream and buckets.
constexpr auto kSetupPatience = std::chrono::seconds(60);

// What only the engine sees; the rest is counted by each partition's service core.
struct EngineCounters {
    std::uint64_t stale_deliveries = 0;  // from a subscription dropped since
    std::uint64_t held_back = 0;         // messages held while a lease was in doubt
    std::uint64_t open_failed = 0;       // tries to start reading a partition that failed
    std::uint64_t gained = 0, lost = 0;  // partitions taken and dropped
};

}  // namespace

std::string default_engine_name() {
    char host[256] = {0};
    ::gethostname(host, sizeof host - 1);
    std::string name = fmt::format("{}-{}", host, ::getpid());
    for (char& c : name) {
        const bool ok = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') ||
                        (c >= '0' && c <= '9') || c == '-' || c == '_';
        if (!ok) c = '_';  // a key-value key allows few characters
    }
    return name;
}

struct ClusterEngine::Impl {
    // A message handed over by the client's thread, tagged with the subscription it came from.
    struct Delivery {
        std::uint32_t partition;
        std::uint64_t generation;
        natsMsg* message;
    };
    // What a subscription's callback knows. Kept until the engine goes: the client may still
    // run a callback just after the subscription is dropped.
    struct Route {
        Impl* impl;
        std::uint32_t partition;
        std::uint64_t generation;
    };
    // A held partition: its own service core (the rules serve runs, with the stream in place of
    // the journal: a message is durable on a quorum before it arrives, so the record log only
    // purges retired matches from the stream; no acknowledgements, which the stream gave the
    // feed; the retired-match bucket as the final-state store) and the consumer that feeds it.
    struct Partition final : service::ServiceActions {
        Partition(Impl& e, std::uint32_t p, std::uint64_t g, service::CoreSettings settings)
            : engine(e), partition(p), generation(g), log(e.quick_js.get(), e.options.layout),
              core(e.params, std::move(settings), e.clock, *this, &log, &*e.retired) {}
        void publish_update(const protocol::UpdateMeta& meta,
                            std::span<const std::uint8_t> update) override {
            engine.publish_update(meta, update);
        }
        // The engine sums every partition's counters (log_counters()).
        void publish_counters(std::span<const std::uint8_t>) override {}
        // Never called: the core is given no deliveries to acknowledge.
        void acknowledge(std::string_view, std::span<const std::uint8_t>) override {}

        Impl& engine;
        std::uint32_t partition;
        std::uint64_t generation;
        FeedPurgeLog log;
        service::ServiceCore core;
        SubscriptionHandle subscription;  // null until the partition could be opened
        // Messages that arrived while the lease was in doubt, applied in order once it is
        // renewed (or dropped with the partition): nothing is folded that cannot be published.
        std::deque<MsgHandle> held_back;
        bool caught_up = false;
        std::uint64_t end_seq = 0;  // the partition's last stream sequence when taken
        Clock::time_point taken_at;
    };

    Impl(ClusterEngineOptions o, core::ModelParams p)
        : options(std::move(o)), params(std::move(p)),
          client(options.servers, {.name = "liveprob engine " + options.engine_name}) {
        // A cluster just started, or one electing a leader, may not answer at once: the set-up
        // is tried again for a while (a stream of another layout is refused at once).
        const auto give_up = Clock::now() + kSetupPatience;
        while (true) {
            try {
                ensure_feed_stream(client.jetstream(), options.layout);
                latest = ensure_latest_bucket(client.jetstream(), options.layout);
                retired_bucket = ensure_retired_bucket(client.jetstream(), options.layout);
                lease_bucket =
                    ensure_lease_bucket(client.jetstream(), options.layout, options.lease_time);
                break;
            } catch (const LayoutMismatch&) {
                throw;
            } catch (const NatsError& e) {
                if (Clock::now() >= give_up) throw;
                spdlog::warn("engine {}: {}; trying again", options.engine_name, e.what());
            }
        }
        // The requests the loop makes while running (renewals, opening a partition) wait at most
        // a renewal interval: a cluster in an election must not hold the loop up for the client's
        // default timeout per request.
        jsOptions quick;
        jsOptions_Init(&quick);
        quick.Wait = std::max<std::int64_t>(100, options.lease_time.count() / 4);
        jsCtx* js = nullptr;
        check(natsConnection_JetStream(&js, client.connection(), &quick), "JetStream context");
        quick_js.reset(js);
        kvStore* bucket = nullptr;
        natsStatus opened = NATS_TIMEOUT;
        for (int attempt = 0; attempt < 20 && opened != NATS_OK; ++attempt)
            opened = js_KeyValue(&bucket, quick_js.get(), options.layout.lease_bucket.c_str());
        check(opened, "lease bucket");
        quick_leases.reset(bucket);
        opened = NATS_TIMEOUT;
        for (int attempt = 0; attempt < 20 && opened != NATS_OK; ++attempt)
            opened = js_KeyValue(&bucket, quick_js.get(), options.layout.retired_bucket.c_str());
        check(opened, "retired-match bucket");
        quick_retired.reset(bucket);
        retired.emplace(quick_retired.get());
        leases.emplace(quick_leases.get(), options.layout, options.engine_name, options.lease_time);
        latest_prefix = fmt::format("$KV.{}.", options.layout.latest_bucket);
    }

    ~Impl() {
        partitions.clear();                         // unsubscribes
        natsConnection_Close(client.connection());  // no callback after this
        std::lock_guard lock(mutex);
        for (const Delivery& d : queue) natsMsg_Destroy(d.message);
    }

    static void on_message(natsConnection*, natsSubscription*, natsMsg* message, void* closure) {
        const auto* route = static_cast<Route*>(closure);
        Impl& self = *route->impl;
        {
            std::lock_guard lock(self.mutex);
            self.queue.push_back({route->partition, route->generation, message});
        }
        self.arrived.notify_one();
    }

    void take(std::uint32_t p, Clock::time_point now) {
        service::CoreSettings settings = options.core;
        // A message published by hand on another partition's subject is refused and counted
        // (`ingest.not_our_shard`), as serve refuses another shard's.
        settings.owns = [layout = options.layout, p](std::uint64_t id) {
            return partition_of(layout, id) == p;
        };
        auto state = std::make_unique<Partition>(*this, p, ++generations, std::move(settings));
        state->taken_at = now;
        spdlog::info("partition {}: taken (lease revision {})", p, leases->revision(p));
        partitions[p] = std::move(state);
        ++counters.gained;
    }

    // Starts reading a held partition from the start of its stream: true once reading. On a
    // cluster that does not answer (an election) it fails and is tried again at the next
    // renewal; the lease is kept meanwhile.
    bool open(std::uint32_t p, Partition& part) {
        // Matches retired by any engine, known before this partition's messages are replayed:
        // theirs are refused (and purged at the next compaction), not rebuilt.
        try {
            retired->reload();
        } catch (const NatsError& e) {
            ++counters.open_failed;
            spdlog::warn("partition {}: cannot read the retired matches ({}); trying again", p,
                         e.what());
            return false;
        }
        const std::string subject = partition_subjects(options.layout, p);
        natsMsg* last = nullptr;
        jsErrCode code = static_cast<jsErrCode>(0);
        const natsStatus found =
            js_GetLastMsg(&last, quick_js.get(), options.layout.feed_stream.c_str(),
                          subject.c_str(), nullptr, &code);
        if (found == NATS_OK) {
            part.end_seq = natsMsg_GetSequence(last);
            natsMsg_Destroy(last);
        } else if (found == NATS_NOT_FOUND || code == JSNoMessageFoundErr) {
            part.caught_up = true;  // nothing to rebuild
        } else {
            ++counters.open_failed;
            spdlog::warn("partition {}: cannot find the end of {} ({}); trying again", p, subject,
                         natsStatus_GetText(found));
            return false;
        }
        routes.push_back(std::make_unique<Route>(Route{this, p, part.generation}));
        jsSubOptions sub_options;
        jsSubOptions_Init(&sub_options);
        sub_options.Stream = options.layout.feed_stream.c_str();
        sub_options.Ordered = true;
        sub_options.Config.DeliverPolicy = js_DeliverAll;
        natsSubscription* sub = nullptr;
        const natsStatus s = js_Subscribe(&sub, quick_js.get(), subject.c_str(), on_message,
                                          routes.back().get(), nullptr, &sub_options, nullptr);
        if (s != NATS_OK) {
            routes.pop_back();  // no subscription holds it
            ++counters.open_failed;
            part.caught_up = false;
            spdlog::warn("partition {}: cannot read {} ({}); trying again", p, subject,
                         natsStatus_GetText(s));
            return false;
        }
        natsSubscription_SetPendingLimits(sub, -1, -1);
        part.subscription.reset(sub);
        spdlog::info("partition {}: reading, rebuilding to stream sequence {}", p, part.end_seq);
        return true;
    }

    // Every held partition not read yet gets a try; after the first failure the rest wait for
    // the next renewal (each failure costs a request timeout).
    void open_pending() {
        for (auto& [p, part] : partitions) {
            if (!part->subscription && !open(p, *part)) return;
        }
    }

    void drop(std::uint32_t p) {
        if (auto it = partitions.find(p); it != partitions.end()) {
            if (it->second->subscription)
                natsSubscription_Unsubscribe(it->second->subscription.get());
            partitions.erase(it);
            spdlog::info("partition {}: dropped", p);
            ++counters.lost;
        }
    }

    // A taken partition's history goes through the core as a restart's journal does (folded,
    // not published); once the stream's end as of the take is reached, each rebuilt match is
    // published once, its output sequence going on from the wall clock (finish_restore()).
    // After that, every message is ingested as serve ingests it.
    void handle(const Delivery& d) {
        MsgHandle owned(d.message);
        const auto it = partitions.find(d.partition);
        if (it == partitions.end() || it->second->generation != d.generation) {
            ++counters.stale_deliveries;
            return;
        }
        Partition& part = *it->second;
        if (!part.held_back.empty() || !leases->fenced_in(d.partition, Clock::now())) {
            part.held_back.push_back(std::move(owned));
            ++counters.held_back;
            return;
        }
        apply(d.partition, part, d.message);
    }

    // Messages held back while a lease was in doubt, applied in order once it is renewed.
    void release_held_back() {
        const auto now = Clock::now();
        for (auto& [p, part] : partitions) {
            if (part->held_back.empty() || !leases->fenced_in(p, now)) continue;
            std::deque<MsgHandle> ready;
            ready.swap(part->held_back);
            for (const MsgHandle& m : ready) apply(p, *part, m.get());
        }
    }

    void apply(std::uint32_t p, Partition& part, natsMsg* message) {
        const std::span<const std::uint8_t> bytes{
            reinterpret_cast<const std::uint8_t*>(natsMsg_GetData(message)),
            static_cast<std::size_t>(natsMsg_GetDataLength(message))};
        if (const auto id = match_of_feed_subject(natsMsg_GetSubject(message)))
            part.log.note(*id, bytes.size());
        if (part.caught_up) {
            (void)part.core.ingest(bytes);
            return;
        }
        std::uint64_t stream_seq = 0, pending = 1;
        jsMsgMetaData* meta = nullptr;
        if (natsMsg_GetMetaData(&meta, message) == NATS_OK) {
            stream_seq = meta->Sequence.Stream;
            pending = meta->NumPending;
            jsMsgMetaData_Destroy(meta);
        }
        part.core.restore(bytes);
        if (stream_seq >= part.end_seq || pending == 0) {
            part.caught_up = true;
            part.core.finish_restore();
            spdlog::info(
                "partition {}: rebuilt {} matches in {} ms", p,
                part.core.registry().matches().size(),
                std::chrono::duration_cast<std::chrono::milliseconds>(Clock::now() - part.taken_at)
                    .count());
        }
    }

    // The core's update, on the match's subject and into the latest-state bucket. Fencing is
    // decided once per message (handle(), release_held_back()) and per tick (tick()): a
    // message is applied only while the lease was renewed within three quarters of its time,
    // so what it publishes goes out before anyone else may hold the partition, and an update
    // computed is never withheld (a subscriber would see a gap in its output sequence).
    void publish_update(const protocol::UpdateMeta& meta, std::span<const std::uint8_t> bytes) {
        const std::string subject = update_subject(options.layout, meta.match_id);
        natsConnection_Publish(client.connection(), subject.c_str(), bytes.data(),
                               static_cast<int>(bytes.size()));
        // The latest state: a plain publish into the bucket's stream (a put nobody waits for;
        // the next update replaces it, and the feed stream can always rebuild it).
        const std::string key = latest_prefix + match_key(meta.match_id);
        natsConnection_Publish(client.connection(), key.c_str(), bytes.data(),
                               static_cast<int>(bytes.size()));
    }

    void tick() {
        const auto now = Clock::now();
        for (auto& [p, part] : partitions) {
            // A partition whose lease is in doubt is not ticked (nothing it would publish may
            // go out); its next tick after the renewal moves the clocks on.
            if (part->caught_up && part->held_back.empty() && leases->fenced_in(p, now))
                part->core.tick();
        }
    }

    void renew(Clock::time_point now) {
        const LeaseChanges changes = leases->renew(now);
        for (const std::uint32_t p : changes.lost) drop(p);
        for (const std::uint32_t p : changes.gained) take(p, now);
        open_pending();
        release_held_back();
    }

    // The partitions' cores' counters summed (those of partitions held now), beside the
    // engine's own.
    void log_counters() {
        std::map<std::string, std::uint64_t> sums;
        for (const auto& [p, part] : partitions) {
            for (const auto& [name, value] : part->core.counter_values()) sums[name] += value;
        }
        std::string line;
        for (const auto& [name, value] : sums) {
            if (value != 0) line += fmt::format(" {}={}", name, value);
        }
        spdlog::info(
            "engine {}: {} partitions of {} ({} engines); taken {}, dropped {}, failed opens {}, "
            "held back while fenced {}, stale deliveries {}; counters:{}",
            options.engine_name, partitions.size(), options.layout.partitions,
            leases->live_engines(), counters.gained, counters.lost, counters.open_failed,
            counters.held_back, counters.stale_deliveries, line);
    }

    void run() {
        spdlog::info("engine {}: cluster mode on {} ({} partitions, lease {} ms)",
                     options.engine_name, client.connected_url(), options.layout.partitions,
                     options.lease_time.count());
        auto next_renew = Clock::now();
        auto next_tick = Clock::now() + options.tick_interval;
        auto next_counters = Clock::now() + options.counters_interval;
        std::deque<Delivery> batch;
        while (!stopping.load()) {
            auto now = Clock::now();
            if (now >= next_renew) {
                renew(now);
                next_renew = now + leases->renew_interval();
            }
            if (now >= next_tick) {
                tick();
                next_tick = now + options.tick_interval;
            }
            if (now >= next_counters) {
                log_counters();
                next_counters = now + options.counters_interval;
            }
            const auto until = std::min({next_renew, next_tick, next_counters, now + kLongestWait});
            {
                std::unique_lock lock(mutex);
                arrived.wait_until(lock, until,
                                   [this] { return !queue.empty() || stopping.load(); });
                batch.swap(queue);
            }
            for (const Delivery& d : batch) {
                handle(d);
                // A long batch (a rebuild, a burst) must not starve the leases: renewed when due
                // between two messages, so the engine does not fence itself out for being busy.
                if (const auto t = Clock::now(); t >= next_renew) {
                    renew(t);
                    next_renew = t + leases->renew_interval();
                }
            }
            batch.clear();
        }
        log_counters();
        for (auto& [p, part] : partitions) {
            if (part->subscription) natsSubscription_Unsubscribe(part->subscription.get());
        }
        natsConnection_FlushTimeout(client.connection(), 2000);
        leases->release_all();
        spdlog::info("engine {}: stopped, leases given back", options.engine_name);
    }

    ClusterEngineOptions options;
    core::ModelParams params;
    service::HostClock clock;
    // What the client's callbacks touch outlives the client (declared before it, so destroyed
    // after it).
    std::mutex mutex;
    std::condition_variable arrived;
    std::deque<Delivery> queue;
    std::vector<std::unique_ptr<Route>> routes;
    NatsClient client;
    KvStoreHandle latest;
    KvStoreHandle lease_bucket;
    KvStoreHandle retired_bucket;
    JsCtxHandle quick_js;                   // short request timeout: the loop's own requests
    KvStoreHandle quick_leases;             // the lease bucket through quick_js
    KvStoreHandle quick_retired;            // the retired-match bucket through quick_js
    std::optional<RetiredMatches> retired;  // shared by the partitions' cores
    std::optional<PartitionLeases> leases;
    std::string latest_prefix;
    std::map<std::uint32_t, std::unique_ptr<Partition>> partitions;
    std::uint64_t generations = 0;
    std::atomic<bool> stopping{false};
    EngineCounters counters;
};

ClusterEngine::ClusterEngine(ClusterEngineOptions options, core::ModelParams params)
    : impl_(std::make_unique<Impl>(std::move(options), std::move(params))) {}
ClusterEngine::~ClusterEngine() = default;
void ClusterEngine::run() { impl_->run(); }
void ClusterEngine::stop() noexcept { impl_->stopping.store(true); }

}  // namespace liveprob::cluster
