#include "liveprob/cluster/cluster_engine.hpp"

#include <fmt/format.h>
#include <spdlog/spdlog.h>
#include <unistd.h>

#include <condition_variable>
#include <deque>
#include <map>
#include <mutex>

#include "liveprob/cluster/cluster_setup.hpp"
#include "liveprob/cluster/nats_client.hpp"
#include "liveprob/cluster/partition_leases.hpp"
#include "liveprob/protocol/feed_codec.hpp"
#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/system/wall_clock.hpp"

namespace liveprob::cluster {
namespace {

using Clock = std::chrono::steady_clock;
// The loop looks at its stop flag at least this often (a signal handler only sets the flag).
constexpr auto kLongestWait = std::chrono::milliseconds(100);

struct Counters {
    std::uint64_t messages = 0, rejected = 0, misrouted = 0, stale = 0;
    std::uint64_t updates = 0, ticks = 0, fenced = 0, retired = 0;
    std::uint64_t gained = 0, lost = 0;
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
    struct Partition {
        Partition(std::uint64_t g, const core::ModelParams& params,
                  const service::RegistryLimits& limits)
            : generation(g), registry(params, limits) {}
        std::uint64_t generation;
        service::MatchRegistry registry;
        SubscriptionHandle subscription;
        bool caught_up = false;
        std::uint64_t end_seq = 0;  // the partition's last stream sequence when taken
        Clock::time_point taken_at;
    };

    Impl(ClusterEngineOptions o, core::ModelParams p)
        : options(std::move(o)), params(std::move(p)),
          client(options.servers, {.name = "liveprob engine " + options.engine_name}) {
        ensure_feed_stream(client.jetstream(), options.layout);
        latest = ensure_latest_bucket(client.jetstream(), options.layout);
        lease_bucket = ensure_lease_bucket(client.jetstream(), options.layout, options.lease_time);
        leases.emplace(lease_bucket.get(), options.layout, options.engine_name, options.lease_time);
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
        auto state = std::make_unique<Partition>(++generations, params, options.limits);
        state->taken_at = now;
        const std::string subject = feed_subject(options.layout, p);
        natsMsg* last = nullptr;
        const natsStatus found =
            js_GetLastMsg(&last, client.jetstream(), options.layout.feed_stream.c_str(),
                          subject.c_str(), nullptr, nullptr);
        if (found == NATS_OK) {
            state->end_seq = natsMsg_GetSequence(last);
            natsMsg_Destroy(last);
        } else {
            state->caught_up = true;  // nothing to rebuild
        }
        routes.push_back(std::make_unique<Route>(Route{this, p, state->generation}));
        jsSubOptions sub_options;
        jsSubOptions_Init(&sub_options);
        sub_options.Stream = options.layout.feed_stream.c_str();
        sub_options.Ordered = true;
        sub_options.Config.DeliverPolicy = js_DeliverAll;
        natsSubscription* sub = nullptr;
        const natsStatus s = js_Subscribe(&sub, client.jetstream(), subject.c_str(), on_message,
                                          routes.back().get(), nullptr, &sub_options, nullptr);
        if (s != NATS_OK) {
            spdlog::error("partition {}: cannot read {}: {}", p, subject, natsStatus_GetText(s));
            return;  // not consumed: the lease is renewed but nothing folds (logged)
        }
        natsSubscription_SetPendingLimits(sub, -1, -1);
        state->subscription.reset(sub);
        spdlog::info("partition {}: taken (lease revision {}), rebuilding to stream sequence {}", p,
                     leases->revision(p), state->end_seq);
        partitions[p] = std::move(state);
        ++counters.gained;
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

    void handle(const Delivery& d) {
        MsgHandle owned(d.message);
        const auto it = partitions.find(d.partition);
        if (it == partitions.end() || it->second->generation != d.generation) {
            ++counters.stale;  // from a subscription dropped since
            return;
        }
        Partition& part = *it->second;
        std::uint64_t stream_seq = 0, pending = 1;
        jsMsgMetaData* meta = nullptr;
        if (natsMsg_GetMetaData(&meta, d.message) == NATS_OK) {
            stream_seq = meta->Sequence.Stream;
            pending = meta->NumPending;
            jsMsgMetaData_Destroy(meta);
        }
        const auto received_at = Clock::now();
        const std::int64_t receive_us = system::wall_clock_us();
        const auto* data = reinterpret_cast<const std::uint8_t*>(natsMsg_GetData(d.message));
        const auto decoded = protocol::decode_feed_message(
            {data, static_cast<std::size_t>(natsMsg_GetDataLength(d.message))});
        ++counters.messages;
        if (!decoded.message) {
            ++counters.rejected;
        } else if (partition_of(options.layout, decoded.message->header.match_id) != d.partition) {
            ++counters.misrouted;  // published by hand on the wrong subject
        } else {
            touched.clear();
            (void)part.registry.handle(*decoded.message, receive_us, received_at, touched);
            if (part.caught_up) {
                for (const std::uint64_t id : touched) {
                    if (auto* m = part.registry.find(id))
                        publish(d.partition, *m, false, received_at);
                }
            }
        }
        if (!part.caught_up && (stream_seq >= part.end_seq || pending == 0))
            caught_up(d.partition, part);
    }

    // The rebuilt partition's matches go on from the wall clock in microseconds and are
    // published once each.
    void caught_up(std::uint32_t p, Partition& part) {
        part.caught_up = true;
        const auto restart_seq = static_cast<std::uint64_t>(system::wall_clock_us());
        const auto now = Clock::now();
        for (auto& [id, m] : part.registry.matches()) {
            m.output_seq = std::max(m.output_seq, restart_seq);
            publish(p, m, false, now);
        }
        spdlog::info(
            "partition {}: rebuilt {} matches in {} ms", p, part.registry.matches().size(),
            std::chrono::duration_cast<std::chrono::milliseconds>(now - part.taken_at).count());
    }

    void publish(std::uint32_t p, service::LiveMatch& m, bool tick, Clock::time_point started) {
        if (!leases->fenced_in(p, Clock::now())) {
            ++counters.fenced;  // the lease is in doubt: another engine may own it by now
            return;
        }
        m.match.price_into(outputs);
        ++m.output_seq;
        protocol::UpdateMeta meta;
        meta.match_id = m.match.match_id();
        meta.output_seq = m.output_seq;
        meta.input_seq = m.input_seq;
        meta.receive_time_us = tick ? 0 : m.receive_time_us;
        meta.compute_ns = static_cast<std::uint32_t>(std::min<std::int64_t>(
            std::chrono::duration_cast<std::chrono::nanoseconds>(Clock::now() - started).count(),
            0xFFFF'FFFF));
        meta.publish_time_us = system::wall_clock_us();
        const auto bytes = encoder.encode(meta, outputs);
        const std::string subject = update_subject(options.layout, meta.match_id);
        natsConnection_Publish(client.connection(), subject.c_str(), bytes.data(),
                               static_cast<int>(bytes.size()));
        // The latest state: a plain publish into the bucket's stream (a put nobody waits for;
        // the next update replaces it, and the feed stream can always rebuild it).
        const std::string key = latest_prefix + latest_key(meta.match_id);
        natsConnection_Publish(client.connection(), key.c_str(), bytes.data(),
                               static_cast<int>(bytes.size()));
        ++(tick ? counters.ticks : counters.updates);
    }

    void tick(Clock::time_point now) {
        for (auto& [p, part] : partitions) {
            if (!part->caught_up) continue;
            for (auto& [id, m] : part->registry.matches()) {
                if (!m.live()) continue;
                part->registry.advance(m, now);
                publish(p, m, true, now);
            }
            counters.retired += part->registry.retire(Clock::now()).matches;
        }
    }

    void renew(Clock::time_point now) {
        const LeaseChanges changes = leases->renew(now);
        for (const std::uint32_t p : changes.lost) drop(p);
        for (const std::uint32_t p : changes.gained) take(p, now);
    }

    void log_counters() {
        std::size_t matches = 0;
        for (const auto& [p, part] : partitions) matches += part->registry.matches().size();
        spdlog::info(
            "engine {}: {} partitions of {} ({} engines), {} matches; messages {}, rejected {}, "
            "misrouted {}, updates {}, ticks {}, withheld while fenced {}, retired {}, taken {}, "
            "dropped {}",
            options.engine_name, partitions.size(), options.layout.partitions,
            leases->live_engines(), matches, counters.messages, counters.rejected,
            counters.misrouted, counters.updates, counters.ticks, counters.fenced, counters.retired,
            counters.gained, counters.lost);
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
                tick(now);
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
            for (const Delivery& d : batch) handle(d);
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
    // What the client's callbacks touch outlives the client (declared before it, so destroyed
    // after it).
    std::mutex mutex;
    std::condition_variable arrived;
    std::deque<Delivery> queue;
    std::vector<std::unique_ptr<Route>> routes;
    NatsClient client;
    KvStoreHandle latest;
    KvStoreHandle lease_bucket;
    std::optional<PartitionLeases> leases;
    std::string latest_prefix;
    std::map<std::uint32_t, std::unique_ptr<Partition>> partitions;
    std::uint64_t generations = 0;
    std::atomic<bool> stopping{false};
    protocol::UpdateEncoder encoder;
    core::Outputs outputs;
    std::vector<std::uint64_t> touched;
    Counters counters;
};

ClusterEngine::ClusterEngine(ClusterEngineOptions options, core::ModelParams params)
    : impl_(std::make_unique<Impl>(std::move(options), std::move(params))) {}
ClusterEngine::~ClusterEngine() = default;
void ClusterEngine::run() { impl_->run(); }
void ClusterEngine::stop() noexcept { impl_->stopping.store(true); }

}  // namespace liveprob::cluster
