// The cluster-mode tests' common parts (cluster_engine_test.cpp, cluster_scale_test.cpp): engine
// processes (`serve --cluster`), `send` to the stream, the lease bucket read back, and a NATS
// subscriber on every match subject that keeps each update as published.
#pragma once

#include <catch2/catch.hpp>

#include <map>
#include <memory>
#include <set>
#include <string>
#include <vector>

#include "live_service_harness.hpp"
#include "liveprob/cluster/cluster_layout.hpp"
#include "liveprob/cluster/nats_client.hpp"
#include "nats_cluster.hpp"

namespace liveprob::test {

using Clock = std::chrono::steady_clock;
inline constexpr int kLeaseMs = 1500;

// `settings`: the service's options (by default no ticks, so every update is one a feed message
// caused, and counters logged each second).
inline std::unique_ptr<ChildProcess> start_engine(
    const std::filesystem::path& dir, const NatsCluster& nats, const std::string& name,
    int lease_ms = kLeaseMs,
    const std::vector<std::string>& settings = {"--tick-ms", "3600000", "--counters-ms", "1000"}) {
    std::vector<std::string> args{
        liveprob_binary().string(), "serve", "--cluster",          nats.urls(),
        "--cluster-engine-name",    name,    "--cluster-lease-ms", std::to_string(lease_ms)};
    args.insert(args.end(), settings.begin(), settings.end());
    return std::make_unique<ChildProcess>(args, dir / (name + ".log"));
}

inline void run_send(const std::filesystem::path& dir, const std::string& name,
                     const NatsCluster& nats, const std::vector<core::InboundMessage>& feed) {
    write_frames(dir / (name + ".frames"), feed);
    ChildProcess send({liveprob_binary().string(), "send", "--to", nats.urls(),
                       (dir / (name + ".frames")).string()},
                      dir / (name + ".out"), dir / (name + ".err"));
    const auto code = send.wait(60s);
    INFO(send.output());
    REQUIRE(code == std::optional<int>(0));
}

// Who holds each partition's lease, read from the lease bucket.
inline std::map<std::uint32_t, std::string> lease_owners(kvStore* leases,
                                                         const cluster::ClusterLayout& layout) {
    std::map<std::uint32_t, std::string> owners;
    for (std::uint32_t p = 0; p < layout.partitions; ++p) {
        kvEntry* entry = nullptr;
        if (kvStore_Get(&entry, leases, cluster::lease_key(p).c_str()) == NATS_OK) {
            owners[p] = kvEntry_ValueString(entry);
            kvEntry_Destroy(entry);
        }
    }
    return owners;
}

// Waits until every partition is held and each engine named holds some (a stable split, so no
// partition moves while the feed is sent).
inline std::map<std::uint32_t, std::string> wait_for_split(kvStore* leases,
                                                           const cluster::ClusterLayout& layout,
                                                           const std::set<std::string>& engines) {
    const auto deadline = Clock::now() + 30s;
    while (Clock::now() < deadline) {
        const auto owners = lease_owners(leases, layout);
        std::map<std::string, std::size_t> held;
        for (const auto& [p, owner] : owners) ++held[owner];
        const std::size_t share = (layout.partitions + engines.size() - 1) / engines.size();
        bool even = owners.size() == layout.partitions && held.size() == engines.size();
        for (const auto& [owner, n] : held) even = even && engines.contains(owner) && n <= share;
        if (even) {
            // One more renewal round, so every engine has subscribed to what it holds.
            std::this_thread::sleep_for(std::chrono::milliseconds(kLeaseMs));
            return owners;
        }
        std::this_thread::sleep_for(100ms);
    }
    FAIL("the engines did not split the partitions in time");
    return {};
}

struct Received {
    protocol::DecodedUpdate update;
    Clock::time_point at;
    std::vector<std::uint8_t> bytes;  // as published
};

// Every update on every match subject, read in the test's thread.
class UpdateCollector {
public:
    UpdateCollector(cluster::NatsClient& client, const cluster::ClusterLayout& layout) {
        natsSubscription* sub = nullptr;
        cluster::check(natsConnection_SubscribeSync(&sub, client.connection(),
                                                    (layout.update_subject_prefix + ".*").c_str()),
                       "subscribe");
        sub_.reset(sub);
        natsSubscription_SetPendingLimits(sub, -1, -1);
        cluster::check(natsConnection_FlushTimeout(client.connection(), 5000), "flush");
    }
    // Reads until `done` holds for what arrived, or the deadline.
    template <typename Done>
    void read_until(Done done, std::chrono::seconds limit) {
        const auto deadline = Clock::now() + limit;
        while (!done(by_match_) && Clock::now() < deadline) {
            natsMsg* raw = nullptr;
            if (natsSubscription_NextMsg(&raw, sub_.get(), 100) != NATS_OK) continue;
            cluster::MsgHandle message(raw);
            const auto* data = reinterpret_cast<const std::uint8_t*>(natsMsg_GetData(raw));
            auto decoded = protocol::decode_update(
                {data, static_cast<std::size_t>(natsMsg_GetDataLength(raw))});
            REQUIRE(decoded.ok());
            by_match_[decoded.value->meta.match_id].push_back(
                {*decoded.value, Clock::now(),
                 std::vector<std::uint8_t>(
                     data, data + static_cast<std::size_t>(natsMsg_GetDataLength(raw)))});
        }
    }
    // Reads until `count` updates arrived in all, or the deadline.
    void read_count(std::size_t count, std::chrono::seconds limit) {
        read_until(
            [count](const auto& got) {
                std::size_t n = 0;
                for (const auto& [id, list] : got) n += list.size();
                return n >= count;
            },
            limit);
    }
    std::map<std::uint64_t, std::vector<Received>>& by_match() { return by_match_; }

private:
    cluster::SubscriptionHandle sub_;
    std::map<std::uint64_t, std::vector<Received>> by_match_;
};

// The test's subscriber stays off node 0, which a test may kill: core NATS delivers nothing to a
// subscriber while it reconnects.
inline std::vector<std::string> subscriber_servers(const NatsCluster& nats) {
    return {nats.url(1), nats.url(2)};
}

inline kvStore* open_bucket(jsCtx* js, const std::string& name) {
    kvStore* bucket = nullptr;
    const auto deadline = Clock::now() + 20s;
    while (js_KeyValue(&bucket, js, name.c_str()) != NATS_OK && Clock::now() < deadline)
        std::this_thread::sleep_for(100ms);
    REQUIRE(bucket != nullptr);
    return bucket;
}

inline std::map<std::uint64_t, std::vector<core::InboundMessage>> invented_matches(
    std::uint64_t first, int count) {
    std::map<std::uint64_t, std::vector<core::InboundMessage>> matches;
    for (std::uint64_t id = first; id < first + static_cast<std::uint64_t>(count); ++id)
        matches[id] = invented_match(id);
    return matches;
}

}  // namespace liveprob::test
