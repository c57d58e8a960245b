// `serve --cluster` over real processes: a three-node JetStream cluster, two engines sharing the
// feed's partitions through leases, `send` publishing a set of invented matches, and a NATS
// subscriber on every match subject. Without failures every update of every match arrives once,
// in order, equal to the in-process engine's, and the latest-state bucket holds each match's
// last one. With one engine killed (SIGKILL) mid-feed the other takes its partitions, rebuilds
// them from the stream, never sends an output sequence backwards, and ends every match in the
// state an uninterrupted run ends it in. The same feed through serve (ZeroMQ) and through the
// engines gives the same update bytes, match by match, apart from the timestamps: both run the
// one service core. With a NATS node killed (SIGKILL) as a feed goes out, every message send
// reports acknowledged is in the end states, no engine stops, no sequence goes back. No timed
// assertions: deadlines only bound a hung run; the longest gap after the kill is printed
// (ctest -V), not asserted.
#include <catch2/catch.hpp>

#include <iostream>
#include <map>
#include <set>

#include "cluster_harness.hpp"

using namespace liveprob;
using namespace liveprob::test;

namespace {

// A three-node cluster, a subscriber on every match subject, and engines A and B once they have
// split the partitions between them.
struct TwoEngines {
    explicit TwoEngines(const std::string& name)
        : dir(scratch_dir(name)), nats(dir), client(subscriber_servers(nats)),
          collector(client, layout), a(start_engine(dir, nats, "engine-a")),
          b(start_engine(dir, nats, "engine-b")),
          lease_bucket(open_bucket(client.jetstream(), layout.lease_bucket)),
          owners(wait_for_split(lease_bucket.get(), layout, {"engine-a", "engine-b"})) {}
    std::filesystem::path dir;
    NatsCluster nats;
    cluster::ClusterLayout layout;
    cluster::NatsClient client;
    UpdateCollector collector;
    std::unique_ptr<ChildProcess> a, b;
    cluster::KvStoreHandle lease_bucket;
    std::map<std::uint32_t, std::string> owners;  // partition -> engine, once split
};

// Every match update serve publishes on its PUB socket, as published, until `count` arrived or
// the deadline passed.
std::map<std::uint64_t, std::vector<std::vector<std::uint8_t>>> read_serve_updates(
    TestSubscriber& subscriber, std::size_t count, std::chrono::seconds limit) {
    std::map<std::uint64_t, std::vector<std::vector<std::uint8_t>>> by_match;
    std::size_t got = 0;
    const auto deadline = Clock::now() + limit;
    while (got < count && Clock::now() < deadline) {
        zmq::pollitem_t item{subscriber.socket().handle(), 0, ZMQ_POLLIN, 0};
        if (zmq::poll(&item, 1, 50ms) <= 0) continue;
        zmq::message_t topic, body;
        REQUIRE(subscriber.socket().recv(topic));
        REQUIRE(topic.more());
        REQUIRE(subscriber.socket().recv(body));
        if (topic.to_string_view() == transport::kCountersTopic) continue;
        const auto decoded = protocol::decode_update({body.data<std::uint8_t>(), body.size()});
        REQUIRE(decoded.ok());
        const auto* p = body.data<std::uint8_t>();
        by_match[decoded.value->meta.match_id].emplace_back(p, p + body.size());
        ++got;
    }
    return by_match;
}

// The bytes of an update that hold its three timestamps (receive and publish time, compute
// time): the update encoded twice with timestamps differing in every byte, compared.
std::vector<bool> timestamp_bytes(const protocol::DecodedUpdate& update) {
    protocol::DecodedUpdate a = update, b = update;
    a.meta.receive_time_us = a.meta.publish_time_us = 0x0101'0101'0101'0101;
    a.meta.compute_ns = 0x0101'0101;
    b.meta.receive_time_us = b.meta.publish_time_us = 0x0202'0202'0202'0202;
    b.meta.compute_ns = 0x0202'0202;
    protocol::UpdateEncoder encoder;
    const auto first = encoder.encode(a.meta, a.outputs, a.details);
    const std::vector<std::uint8_t> kept(first.begin(), first.end());
    const auto second = encoder.encode(b.meta, b.outputs, b.details);
    REQUIRE(second.size() == kept.size());
    std::vector<bool> mask(kept.size());
    for (std::size_t i = 0; i < kept.size(); ++i) mask[i] = kept[i] != second[i];
    return mask;
}

}  // namespace

TEST_CASE(
    "two cluster engines publish every update of every match once, in order, as the "
    "in-process engine computes it",
    "[sockets]") {
    TwoEngines run("cluster-engines");
    auto& [dir, nats, layout, client, collector, a, b, lease_bucket, owners] = run;

    const auto matches = invented_matches(901, 24);
    std::vector<core::InboundMessage> feed;
    std::map<std::uint64_t, std::vector<ReferenceOutput>> expected;
    for (const auto& [id, messages] : matches) {
        feed.insert(feed.end(), messages.begin(), messages.end());
        expected[id] = engine_outputs(messages);
    }
    run_send(dir, "feed", nats, feed);

    collector.read_until(
        [&](const auto& got) {
            for (const auto& [id, want] : expected) {
                const auto it = got.find(id);
                if (it == got.end() || it->second.size() < want.size()) return false;
            }
            return true;
        },
        30s);
    // A moment more: anything published twice would arrive now.
    collector.read_until([](const auto&) { return false; }, 1s);

    int wrong = 0;
    for (const auto& [id, want] : expected) {
        const auto& got = collector.by_match()[id];
        INFO("match " << id << ": " << got.size() << " updates, " << want.size() << " expected");
        CHECK(got.size() == want.size());
        for (std::size_t i = 0; i < std::min(got.size(), want.size()); ++i) {
            if (got[i].update.meta.input_seq != want[i].input_seq ||
                !same_outputs(got[i].update.outputs, want[i].outputs))
                ++wrong;
            if (i > 0 && got[i].update.meta.output_seq <= got[i - 1].update.meta.output_seq)
                ++wrong;
        }
    }
    CHECK(wrong == 0);

    // Late joiners: the latest-state bucket holds each match's last update.
    kvStore* latest_raw = nullptr;
    REQUIRE(js_KeyValue(&latest_raw, client.jetstream(), layout.latest_bucket.c_str()) == NATS_OK);
    cluster::KvStoreHandle latest(latest_raw);
    int stale = 0;
    for (const auto& [id, want] : expected) {
        kvEntry* entry = nullptr;
        REQUIRE(kvStore_Get(&entry, latest.get(), cluster::match_key(id).c_str()) == NATS_OK);
        cluster::KvEntryHandle owned(entry);
        const auto decoded =
            protocol::decode_update({static_cast<const std::uint8_t*>(kvEntry_Value(entry)),
                                     static_cast<std::size_t>(kvEntry_ValueLen(entry))});
        REQUIRE(decoded.ok());
        if (!same_outputs(decoded.value->outputs, want.back().outputs)) ++stale;
    }
    CHECK(stale == 0);

    // Both engines did some of the work, and both stop cleanly on SIGTERM.
    CHECK(a->stop() == std::optional<int>(0));
    CHECK(b->stop() == std::optional<int>(0));
}

TEST_CASE(
    "serve and the cluster engines run one service core: the same feed gives the same update "
    "bytes, apart from the timestamps",
    "[sockets]") {
    const auto matches = invented_matches(2101, 12);
    std::vector<core::InboundMessage> feed;
    std::size_t updates = 0;
    for (const auto& [id, messages] : matches) {
        feed.insert(feed.end(), messages.begin(), messages.end());
        updates += engine_outputs(messages).size();
    }

    // The single-machine service over ZeroMQ; no ticks in either run (they depend on when the
    // timer fires), so every update is one a feed message caused.
    TwoEngines run("cluster-same-bytes");
    auto& [dir, nats, layout, client, collector, a, b, lease_bucket, owners] = run;
    ServeProcess serve(dir, "serve", {"--tick-ms", "3600000", "--counters-ms", "200"});
    zmq::context_t context;
    TestSubscriber subscriber(context, serve.publish(), std::string(transport::kMatchTopicPrefix));
    REQUIRE(subscriber.next_counters(20s).has_value());
    write_frames(dir / "serve-feed.frames", feed);
    ChildProcess send({liveprob_binary().string(), "send", "--to", serve.ingest(),
                       (dir / "serve-feed.frames").string()},
                      dir / "serve-send.out", dir / "serve-send.err");
    REQUIRE(send.wait(60s) == std::optional<int>(0));
    const auto from_serve = read_serve_updates(subscriber, updates, 30s);

    // The same feed through the cluster (two engines, each partition's own core).
    run_send(dir, "cluster-feed", nats, feed);
    collector.read_count(updates, 30s);
    collector.read_until([](const auto&) { return false; }, 1s);  // anything more arrives now

    REQUIRE(from_serve.size() == matches.size());
    int compared = 0, differing = 0;
    for (const auto& [id, serve_updates] : from_serve) {
        const auto& cluster_updates = collector.by_match()[id];
        INFO("match " << id << ": serve " << serve_updates.size() << " updates, cluster "
                      << cluster_updates.size());
        REQUIRE(serve_updates.size() == cluster_updates.size());
        for (std::size_t i = 0; i < serve_updates.size(); ++i) {
            const auto& ours = serve_updates[i];
            const auto& theirs = cluster_updates[i].bytes;
            const auto decoded = protocol::decode_update({ours.data(), ours.size()});
            REQUIRE(decoded.ok());
            // The mask applies to the bytes as published: re-encoding them reproduces them.
            protocol::UpdateEncoder encoder;
            const auto again =
                encoder.encode(decoded.value->meta, decoded.value->outputs, decoded.value->details);
            REQUIRE(std::vector<std::uint8_t>(again.begin(), again.end()) == ours);
            const std::vector<bool> timestamps = timestamp_bytes(*decoded.value);
            // Two 8-byte times and a 4-byte duration: nothing else is left out of the comparison.
            REQUIRE(std::count(timestamps.begin(), timestamps.end(), true) == 20);
            REQUIRE(theirs.size() == ours.size());
            for (std::size_t k = 0; k < ours.size(); ++k) {
                if (!timestamps[k] && ours[k] != theirs[k]) ++differing;
            }
            ++compared;
        }
    }
    std::cout << "serve and cluster: " << compared << " updates of " << from_serve.size()
              << " matches compared byte for byte, " << differing << " bytes differ" << std::endl;
    CHECK(compared == static_cast<int>(updates));
    CHECK(differing == 0);
    CHECK(a->stop() == std::optional<int>(0));
    CHECK(b->stop() == std::optional<int>(0));
}

TEST_CASE(
    "a cluster engine killed with SIGKILL: the other takes its partitions and every match "
    "ends as in an uninterrupted run",
    "[sockets]") {
    TwoEngines run("cluster-failover");
    auto& [dir, nats, layout, client, collector, a, b, lease_bucket, owners] = run;

    // The first half of every match, then engine A dies, then the rest.
    const auto matches = invented_matches(1201, 24);
    std::vector<core::InboundMessage> first_half, second_half;
    std::map<std::uint64_t, std::vector<ReferenceOutput>> expected;
    std::set<std::uint64_t> affected;  // matches of A's partitions
    for (const auto& [id, messages] : matches) {
        const auto half = messages.begin() + static_cast<std::ptrdiff_t>(messages.size() / 2);
        first_half.insert(first_half.end(), messages.begin(), half);
        second_half.insert(second_half.end(), half, messages.end());
        expected[id] = engine_outputs(messages);
        if (owners.at(cluster::partition_of(layout, id)) == "engine-a") affected.insert(id);
    }
    REQUIRE_FALSE(affected.empty());
    run_send(dir, "first", nats, first_half);
    collector.read_until(
        [&](const auto& got) {
            for (const auto& [id, want] : expected) {
                const auto it = got.find(id);
                if (it == got.end() || it->second.empty() ||
                    it->second.back().update.meta.input_seq < matches.at(id).size() / 2)
                    return false;
            }
            return true;
        },
        30s);

    a->signal(SIGKILL);
    REQUIRE(a->wait(10s).has_value());
    const auto killed_at = Clock::now();
    run_send(dir, "second", nats, second_half);

    const auto finished = [&](const auto& got) {
        for (const auto& [id, want] : expected) {
            const auto it = got.find(id);
            if (it == got.end() || it->second.empty() ||
                it->second.back().update.meta.input_seq != want.back().input_seq)
                return false;
        }
        return true;
    };
    collector.read_until(finished, 30s);
    REQUIRE(finished(collector.by_match()));

    int wrong_final = 0, backwards = 0;
    double longest_gap_ms = 0.0;
    for (const auto& [id, want] : expected) {
        const auto& got = collector.by_match()[id];
        if (!same_outputs(got.back().update.outputs, want.back().outputs)) ++wrong_final;
        for (std::size_t i = 1; i < got.size(); ++i) {
            if (got[i].update.meta.output_seq <= got[i - 1].update.meta.output_seq) ++backwards;
        }
        if (affected.contains(id)) {
            for (const auto& r : got) {
                if (r.at > killed_at) {
                    longest_gap_ms = std::max(
                        longest_gap_ms,
                        std::chrono::duration<double, std::milli>(r.at - killed_at).count());
                    break;
                }
            }
        }
    }
    CHECK(wrong_final == 0);
    CHECK(backwards == 0);
    // Engine B holds every partition now.
    for (const auto& [p, owner] : lease_owners(lease_bucket.get(), layout))
        CHECK(owner == "engine-b");
    std::cout << "cluster failover: " << affected.size() << " of " << expected.size()
              << " matches on the killed engine; longest gap from the kill to their next update "
              << longest_gap_ms << " ms (lease " << kLeaseMs << " ms)" << std::endl;
    CHECK(b->stop() == std::optional<int>(0));
}

TEST_CASE(
    "a NATS node killed with SIGKILL mid-feed: no engine stops and every match ends as in "
    "an uninterrupted run",
    "[sockets]") {
    TwoEngines run("cluster-node-loss");
    auto& [dir, nats, layout, client, collector, a, b, lease_bucket, owners] = run;
    const auto matches = invented_matches(1501, 24);
    std::vector<core::InboundMessage> first_half, second_half;
    std::map<std::uint64_t, std::vector<ReferenceOutput>> expected;
    for (const auto& [id, messages] : matches) {
        const auto half = messages.begin() + static_cast<std::ptrdiff_t>(messages.size() / 2);
        first_half.insert(first_half.end(), messages.begin(), half);
        second_half.insert(second_half.end(), half, messages.end());
        expected[id] = engine_outputs(messages);
    }
    run_send(dir, "first", nats, first_half);

    // Node 0 dies as the second half goes out (before or while `send` publishes it: both are
    // the case to survive). send exits 0 only when every message was acknowledged, so nothing
    // it sent may be missing from the end states.
    write_frames(dir / "second.frames", second_half);
    ChildProcess send(
        {liveprob_binary().string(), "send", "--to", nats.urls(), (dir / "second.frames").string()},
        dir / "second.out", dir / "second.err");
    nats.kill(0);
    const auto code = send.wait(60s);
    INFO(send.output());
    REQUIRE(code == std::optional<int>(0));

    const auto finished = [&](const auto& got) {
        for (const auto& [id, want] : expected) {
            const auto it = got.find(id);
            if (it == got.end() || it->second.empty() ||
                it->second.back().update.meta.input_seq != want.back().input_seq)
                return false;
        }
        return true;
    };
    collector.read_until(finished, 60s);
    REQUIRE(finished(collector.by_match()));
    collector.read_until([](const auto&) { return false; }, 1s);  // anything more arrives now
    // A partition may move while the cluster elects (a lease in doubt too long): its matches
    // are then published once more by the new owner, with higher output sequences; never
    // an input or output sequence going back.
    int wrong_final = 0, backwards = 0;
    for (const auto& [id, want] : expected) {
        const auto& got = collector.by_match()[id];
        if (!same_outputs(got.back().update.outputs, want.back().outputs)) ++wrong_final;
        for (std::size_t i = 1; i < got.size(); ++i) {
            if (got[i].update.meta.output_seq <= got[i - 1].update.meta.output_seq ||
                got[i].update.meta.input_seq < got[i - 1].update.meta.input_seq)
                ++backwards;
        }
    }
    CHECK(wrong_final == 0);
    CHECK(backwards == 0);
    CHECK(a->running());
    CHECK(b->running());
}
