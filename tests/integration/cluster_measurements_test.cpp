// Cluster mode measured in one run over real processes (figures in tools/bench/RESULTS.md): a
// three-node JetStream cluster with one engine holding every partition, and serve over ZeroMQ
// beside it.
//  1. Latency event -> subscriber: the same paced events go to serve's ingest socket and to the
//     feed stream from this process; a subscriber on each side notes when each event's update
//     arrives (send and receive times on this process's steady clock).
//  2. Throughput of one engine: a burst of whole matches published with acknowledgements; the
//     time until the subscriber has every update, and the engine's CPU time meanwhile.
//  3. Fan-out: many NATS subscriptions on `liveprob.match.*`, spread over connections to all
//     three nodes, each receiving every update of paced events; delivery latency from the
//     engine's publish time (wall clock, same machine) to the callback.
// Modest sizes by default, so it fits the fast test command; the sizes come from
// LIVEPROB_MEASURE_EVENTS, LIVEPROB_MEASURE_MATCHES and LIVEPROB_MEASURE_SUBSCRIBERS for a run
// by hand. Only correctness is asserted (every update arrives, once per subscription); the
// figures are printed (ctest -V).
#include <catch2/catch.hpp>

#include <atomic>
#include <cstdlib>
#include <iostream>
#include <map>
#include <mutex>
#include <thread>

#include "cluster_harness.hpp"
#include "liveprob/cluster/feed_publisher.hpp"
#include "liveprob/protocol/feed_codec.hpp"

using namespace liveprob;
using namespace liveprob::test;

namespace {

std::size_t size_from_env(const char* name, std::size_t fallback) {
    const char* value = std::getenv(name);
    return value != nullptr && *value != '\0' ? std::stoul(value) : fallback;
}

double ms_between(Clock::time_point from, Clock::time_point to) {
    return std::chrono::duration<double, std::milli>(to - from).count();
}

struct Percentiles {
    double p50 = 0, p99 = 0, max = 0;
    std::size_t count = 0;
};
Percentiles percentiles(std::vector<double> values) {
    Percentiles p;
    p.count = values.size();
    if (values.empty()) return p;
    std::sort(values.begin(), values.end());
    const auto at = [&](double q) {
        return values[std::min(values.size() - 1,
                               static_cast<std::size_t>(q * static_cast<double>(values.size())))];
    };
    p.p50 = at(0.50);
    p.p99 = at(0.99);
    p.max = values.back();
    return p;
}
std::ostream& operator<<(std::ostream& out, const Percentiles& p) {
    return out << "p50 " << p.p50 << " ms, p99 " << p.p99 << " ms, max " << p.max << " ms ("
               << p.count << ")";
}

std::int64_t wall_us() {
    return std::chrono::duration_cast<std::chrono::microseconds>(
               std::chrono::system_clock::now().time_since_epoch())
        .count();
}

using Key = std::pair<std::uint64_t, std::uint64_t>;  // match id, input sequence

// Setups and kick-offs of `matches` matches from `first`.
std::vector<core::InboundMessage> openings(std::uint64_t first, std::uint64_t matches) {
    std::vector<core::InboundMessage> out;
    for (std::uint64_t id = first; id < first + matches; ++id) {
        const auto match = invented_match(id);
        out.push_back(match[0]);
        out.push_back(match[1]);
    }
    return out;
}

// The k-th paced event (from 0) over `matches` matches: a clock sync, each one repriced.
core::InboundMessage paced_event(std::uint64_t first, std::uint64_t matches, std::size_t k) {
    const std::uint64_t id = first + k % matches;
    const std::uint64_t round = k / matches;
    return feed_message(id, 3 + round, core::Period::first_half,
                        static_cast<std::uint32_t>(1000 + 100 * round), core::ClockSync{true});
}

// Publishes one feed message on its subject with its message id, without waiting for the
// stream's acknowledgement (as a feed that measures only the event's way to the subscriber).
void publish_to_stream(cluster::NatsClient& client, const cluster::ClusterLayout& layout,
                       const core::InboundMessage& m) {
    const auto bytes = protocol::encode_feed_message(m);
    natsMsg* raw = nullptr;
    cluster::check(
        natsMsg_Create(&raw, cluster::feed_subject(layout, m.header.match_id).c_str(), nullptr,
                       reinterpret_cast<const char*>(bytes.data()), static_cast<int>(bytes.size())),
        "message");
    cluster::MsgHandle message(raw);
    natsMsgHeader_Set(raw, "Nats-Msg-Id", cluster::feed_message_id(m.header).c_str());
    cluster::check(natsConnection_PublishMsg(client.connection(), raw), "publish");
}

// Arrival times by (match, input sequence), written by a receiving thread as each update
// arrives, and every arrival counted.
struct Arrivals {
    std::mutex mutex;
    std::map<Key, Clock::time_point> at;
    std::size_t count = 0;
    void note(const protocol::DecodedUpdate& u) {
        const auto now = Clock::now();
        std::lock_guard lock(mutex);
        at.emplace(Key{u.meta.match_id, u.meta.input_seq}, now);
        ++count;
    }
    std::size_t size() {
        std::lock_guard lock(mutex);
        return count;
    }
    // Waits until `n` updates arrived in all, or the deadline.
    void wait_for(std::size_t n, std::chrono::seconds limit) {
        const auto deadline = Clock::now() + limit;
        while (size() < n && Clock::now() < deadline) std::this_thread::sleep_for(5ms);
    }
    // A NATS subscription's callback (the client's thread).
    static void on_message(natsConnection*, natsSubscription*, natsMsg* raw, void* closure) {
        const cluster::MsgHandle message(raw);
        const auto decoded =
            protocol::decode_update({reinterpret_cast<const std::uint8_t*>(natsMsg_GetData(raw)),
                                     static_cast<std::size_t>(natsMsg_GetDataLength(raw))});
        if (decoded.ok()) static_cast<Arrivals*>(closure)->note(*decoded.value);
    }
};

// One fan-out subscription's callback target: a shared tally of deliveries and latencies.
struct FanOut {
    std::atomic<std::uint64_t> deliveries{0};
    std::mutex mutex;
    std::vector<double> latency_ms;
    static void on_message(natsConnection*, natsSubscription*, natsMsg* raw, void* closure) {
        const std::int64_t now = wall_us();
        auto& self = *static_cast<FanOut*>(closure);
        const cluster::MsgHandle message(raw);
        const auto decoded =
            protocol::decode_update({reinterpret_cast<const std::uint8_t*>(natsMsg_GetData(raw)),
                                     static_cast<std::size_t>(natsMsg_GetDataLength(raw))});
        if (!decoded.ok()) return;
        const double ms = static_cast<double>(now - decoded.value->meta.publish_time_us) / 1000.0;
        {
            std::lock_guard lock(self.mutex);
            self.latency_ms.push_back(ms);
        }
        self.deliveries.fetch_add(1);
    }
};

struct ConnectionDeleter {
    void operator()(natsConnection* c) const noexcept { natsConnection_Destroy(c); }
};

}  // namespace

TEST_CASE(
    "cluster measurements: latency beside serve's and one engine's throughput and fan-out to "
    "many NATS subscriptions",
    "[sockets]") {
    const std::size_t events = size_from_env("LIVEPROB_MEASURE_EVENTS", 600);
    const std::size_t burst_matches = size_from_env("LIVEPROB_MEASURE_MATCHES", 100);
    const std::size_t subscriptions = size_from_env("LIVEPROB_MEASURE_SUBSCRIBERS", 300);
    constexpr std::uint64_t kPacedMatches = 20;
    constexpr auto kEventGap = std::chrono::microseconds(5000);  // 200 events per second

    const auto dir = scratch_dir("cluster-measurements");
    NatsCluster nats(dir);
    cluster::ClusterLayout layout;
    auto engine = start_engine(dir, nats, "engine-m", 5000);
    cluster::NatsClient feed_client(cluster::split_servers(nats.urls()));
    cluster::NatsClient client(subscriber_servers(nats));
    const cluster::KvStoreHandle leases(open_bucket(client.jetstream(), layout.lease_bucket));
    wait_for_split(leases.get(), layout, {"engine-m"});
    ServeProcess serve(dir, "serve", {"--tick-ms", "3600000", "--counters-ms", "200"});
    zmq::context_t context(1);
    TestSubscriber serve_sub(context, serve.publish(), std::string(transport::kMatchTopicPrefix),
                             100'000);
    REQUIRE(serve_sub.next_counters(20s).has_value());
    zmq::socket_t serve_feed(context, zmq::socket_type::dealer);
    serve_feed.set(zmq::sockopt::linger, 2000);
    serve_feed.connect(serve.ingest());

    // 1. Latency, both paths in the same run.
    Arrivals via_serve, via_cluster;
    natsSubscription* raw_sub = nullptr;
    cluster::check(natsConnection_Subscribe(&raw_sub, client.connection(),
                                            (layout.update_subject_prefix + ".*").c_str(),
                                            Arrivals::on_message, &via_cluster),
                   "subscribe");
    const cluster::SubscriptionHandle cluster_sub(raw_sub);
    natsSubscription_SetPendingLimits(raw_sub, -1, -1);
    cluster::check(natsConnection_FlushTimeout(client.connection(), 5000), "flush");
    std::atomic<bool> reading{true};
    std::thread serve_reader([&] {
        while (reading.load()) {
            for (const auto& u : serve_sub.updates(1, 50ms)) via_serve.note(u);
        }
    });
    for (const auto& m : openings(1, kPacedMatches)) {
        const auto bytes = protocol::encode_feed_message(m);
        serve_feed.send(zmq::buffer(bytes));
        publish_to_stream(feed_client, layout, m);
    }
    natsConnection_FlushTimeout(feed_client.connection(), 5000);
    via_cluster.wait_for(2 * kPacedMatches, 30s);
    via_serve.wait_for(2 * kPacedMatches, 30s);
    std::map<Key, Clock::time_point> sent;
    auto next = Clock::now();
    for (std::size_t k = 0; k < events; ++k) {
        const auto m = paced_event(1, kPacedMatches, k);
        const auto bytes = protocol::encode_feed_message(m);
        std::this_thread::sleep_until(next);
        next += kEventGap;
        sent[{m.header.match_id, m.header.source_seq}] = Clock::now();
        // Each path goes first on every other event, so neither waits on the other throughout.
        if (k % 2 == 0) {
            serve_feed.send(zmq::buffer(bytes));
            publish_to_stream(feed_client, layout, m);
            natsConnection_Flush(feed_client.connection());
        } else {
            publish_to_stream(feed_client, layout, m);
            natsConnection_Flush(feed_client.connection());
            serve_feed.send(zmq::buffer(bytes));
        }
    }
    via_cluster.wait_for(2 * kPacedMatches + events, 60s);
    via_serve.wait_for(2 * kPacedMatches + events, 30s);
    reading.store(false);
    serve_reader.join();
    std::vector<double> serve_ms, cluster_ms;
    for (const auto& [key, at] : sent) {
        if (const auto it = via_serve.at.find(key); it != via_serve.at.end())
            serve_ms.push_back(ms_between(at, it->second));
        if (const auto it = via_cluster.at.find(key); it != via_cluster.at.end())
            cluster_ms.push_back(ms_between(at, it->second));
    }
    CHECK(serve_ms.size() == events);
    CHECK(cluster_ms.size() == events);
    std::cout << "latency event -> subscriber, " << events << " events at 200/s over "
              << kPacedMatches << " matches\n  serve (ZeroMQ): " << percentiles(serve_ms)
              << "\n  cluster (JetStream, 3 copies): " << percentiles(cluster_ms) << std::endl;

    // 2. One engine's throughput: whole matches published with acknowledgements at once.
    std::vector<core::InboundMessage> burst;
    std::size_t burst_updates = 0;
    for (const auto& [id, messages] : invented_matches(100'001, static_cast<int>(burst_matches))) {
        burst.insert(burst.end(), messages.begin(), messages.end());
        burst_updates += engine_outputs(messages).size();
    }
    const std::size_t seen_before = via_cluster.size();
    const double cpu_before = harness::cpu_seconds(engine->pid());
    const auto burst_start = Clock::now();
    {
        cluster::FeedPublisher publisher(feed_client, layout, {});
        for (const auto& m : burst) {
            const auto bytes = protocol::encode_feed_message(m);
            publisher.send(m.header, bytes);
        }
        publisher.finish();
        REQUIRE(publisher.acknowledged() == burst.size());
    }
    const auto acknowledged_at = Clock::now();
    via_cluster.wait_for(seen_before + burst_updates, 120s);
    const auto burst_end = Clock::now();
    const std::size_t seen_after = via_cluster.size();
    const double cpu = harness::cpu_seconds(engine->pid()) - cpu_before;
    CHECK(seen_after - seen_before == burst_updates);
    const double seconds = ms_between(burst_start, burst_end) / 1000.0;
    std::cout << "one engine, burst of " << burst_matches << " matches (" << burst.size()
              << " messages, " << burst_updates << " updates): all acknowledged in "
              << ms_between(burst_start, acknowledged_at) << " ms, all updates received in "
              << seconds * 1000 << " ms: " << static_cast<double>(burst.size()) / seconds
              << " messages/s, " << static_cast<double>(burst_matches) / seconds
              << " matches/s; engine CPU " << cpu << " s ("
              << static_cast<double>(burst.size()) / std::max(cpu, 1e-3)
              << " messages per engine CPU second)" << std::endl;

    // 3. Fan-out: subscriptions spread over connections to all three nodes, 100 each, their
    // callbacks run by a shared pool of delivery threads (not a thread per subscription).
    nats_SetMessageDeliveryPoolSize(4);
    const std::size_t connections = (subscriptions + 99) / 100;
    FanOut fan_out;
    std::vector<std::unique_ptr<natsConnection, ConnectionDeleter>> fan_connections;
    std::vector<cluster::SubscriptionHandle> fan_subs;
    for (std::size_t c = 0; c < connections; ++c) {
        natsOptions* options = nullptr;
        cluster::check(natsOptions_Create(&options), "options");
        const std::string url = nats.url(static_cast<int>(c % 3));
        natsOptions_SetURL(options, url.c_str());
        natsOptions_UseGlobalMessageDelivery(options, true);
        natsConnection* connection = nullptr;
        const natsStatus connected = natsConnection_Connect(&connection, options);
        natsOptions_Destroy(options);
        cluster::check(connected, "fan-out connection");
        fan_connections.emplace_back(connection);
        for (std::size_t s = c * 100; s < std::min(subscriptions, (c + 1) * 100); ++s) {
            natsSubscription* sub = nullptr;
            cluster::check(natsConnection_Subscribe(&sub, connection,
                                                    (layout.update_subject_prefix + ".*").c_str(),
                                                    FanOut::on_message, &fan_out),
                           "fan-out subscription");
            natsSubscription_SetPendingLimits(sub, -1, -1);
            fan_subs.emplace_back(sub);
        }
        cluster::check(natsConnection_FlushTimeout(connection, 10'000), "fan-out flush");
    }
    // Interest reaches the other nodes through the routes: a moment for it to spread.
    std::this_thread::sleep_for(1s);
    constexpr std::size_t kFanEvents = 100;
    next = Clock::now();
    for (std::size_t k = 0; k < kFanEvents; ++k) {
        std::this_thread::sleep_until(next);
        next += std::chrono::milliseconds(20);  // 50 events per second
        publish_to_stream(feed_client, layout, paced_event(1, kPacedMatches, events + k));
        natsConnection_Flush(feed_client.connection());
    }
    const std::uint64_t expected = subscriptions * kFanEvents;
    const auto fan_deadline = Clock::now() + 120s;
    while (fan_out.deliveries.load() < expected && Clock::now() < fan_deadline)
        std::this_thread::sleep_for(50ms);
    std::this_thread::sleep_for(500ms);  // anything delivered twice arrives now
    fan_subs.clear();
    fan_connections.clear();
    CHECK(fan_out.deliveries.load() == expected);
    std::cout << "fan-out: " << subscriptions << " subscriptions on " << connections
              << " connections over 3 nodes, " << kFanEvents
              << " updates at 50/s: " << fan_out.deliveries.load() << " deliveries of " << expected
              << "; engine publish -> callback " << percentiles(fan_out.latency_ms) << std::endl;
    CHECK(engine->stop() == std::optional<int>(0));
}
