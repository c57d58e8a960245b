// Retention in cluster mode over real processes: a three-node JetStream cluster, two engines
// retiring finished matches after a short retention (serve's `--retention-s`, compaction every
// `--journal-compact-s`) and buckets keeping entries a few seconds (`--cluster-keep-s`). A
// finished match's final update goes to the retired-match bucket, then its messages are purged
// from the feed stream, then its latest state ages out of the latest-state bucket; a match still
// in play keeps every message and a fresh latest state. Killing an engine afterwards still hands
// its partitions over: the survivor rebuilds the live matches from what is left of the stream
// and publishes them, and publishes nothing for the retired ones. No timed assertions: the
// deadlines only bound a hung run.
#include <catch2/catch.hpp>

#include <iostream>
#include <map>
#include <set>

#include "cluster_harness.hpp"

using namespace liveprob;
using namespace liveprob::test;

namespace {

constexpr int kKeepS = 6;

bool has_feed_messages(jsCtx* js, const cluster::ClusterLayout& layout, std::uint64_t id) {
    natsMsg* last = nullptr;
    const natsStatus status =
        js_GetLastMsg(&last, js, layout.feed_stream.c_str(),
                      cluster::feed_subject(layout, id).c_str(), nullptr, nullptr);
    natsMsg_Destroy(last);
    return status == NATS_OK;
}

std::optional<protocol::DecodedUpdate> bucket_entry(kvStore* bucket, std::uint64_t id) {
    kvEntry* raw = nullptr;
    if (kvStore_Get(&raw, bucket, cluster::match_key(id).c_str()) != NATS_OK) return std::nullopt;
    const cluster::KvEntryHandle entry(raw);
    auto decoded = protocol::decode_update({static_cast<const std::uint8_t*>(kvEntry_Value(raw)),
                                            static_cast<std::size_t>(kvEntry_ValueLen(raw))});
    REQUIRE(decoded.ok());
    return *decoded.value;
}

// Polls `done` every 100 ms until it holds or the deadline passes; its last answer.
template <typename Done>
bool eventually(Done done, std::chrono::seconds limit) {
    const auto deadline = Clock::now() + limit;
    while (!done()) {
        if (Clock::now() >= deadline) return false;
        std::this_thread::sleep_for(100ms);
    }
    return true;
}

}  // namespace

TEST_CASE(
    "cluster retention: a finished match leaves the feed stream and the latest-state bucket "
    "after the retention with its final state kept while live matches stay and a take-over "
    "still works",
    "[sockets]") {
    const std::filesystem::path dir = scratch_dir("cluster-retention");
    NatsCluster nats(dir);
    cluster::ClusterLayout layout;
    cluster::NatsClient client(subscriber_servers(nats));
    UpdateCollector collector(client, layout);
    const std::vector<std::string> settings{"--tick-ms",           "200",
                                            "--counters-ms",       "1000",
                                            "--retention-s",       "1",
                                            "--journal-compact-s", "1",
                                            "--cluster-keep-s",    std::to_string(kKeepS)};
    auto a = start_engine(dir, nats, "engine-a", kLeaseMs, settings);
    auto b = start_engine(dir, nats, "engine-b", kLeaseMs, settings);
    const cluster::KvStoreHandle leases(open_bucket(client.jetstream(), layout.lease_bucket));
    const auto owners = wait_for_split(leases.get(), layout, {"engine-a", "engine-b"});
    const cluster::KvStoreHandle latest(open_bucket(client.jetstream(), layout.latest_bucket));
    const cluster::KvStoreHandle retired(open_bucket(client.jetstream(), layout.retired_bucket));

    // Finished matches play to the final whistle; live ones stop at half-time.
    const auto finished = invented_matches(3001, 12);
    auto live = invented_matches(3101, 12);
    std::vector<core::InboundMessage> feed;
    std::size_t live_messages = 0;
    for (const auto& [id, messages] : finished)
        feed.insert(feed.end(), messages.begin(), messages.end());
    for (auto& [id, messages] : live) {
        messages.resize(messages.size() / 2);
        live_messages += messages.size();
        feed.insert(feed.end(), messages.begin(), messages.end());
    }
    run_send(dir, "feed", nats, feed);

    // Each finished match retires into the retired-match bucket with its final state.
    std::map<std::uint64_t, protocol::DecodedUpdate> final_states;
    REQUIRE(eventually(
        [&] {
            for (const auto& [id, messages] : finished) {
                if (final_states.contains(id)) continue;
                if (auto entry = bucket_entry(retired.get(), id)) final_states.emplace(id, *entry);
            }
            return final_states.size() == finished.size();
        },
        30s));
    int wrong_final = 0;
    for (const auto& [id, state] : final_states) {
        const auto want = engine_outputs(finished.at(id));
        if (state.meta.input_seq != want.back().input_seq ||
            !same_outputs(state.outputs, want.back().outputs))
            ++wrong_final;
    }
    CHECK(wrong_final == 0);

    // Then its messages are purged from the stream; the live matches keep every one of theirs.
    REQUIRE(eventually(
        [&] {
            for (const auto& [id, messages] : finished) {
                if (has_feed_messages(client.jetstream(), layout, id)) return false;
            }
            return true;
        },
        30s));
    for (const auto& [id, messages] : live)
        CHECK(has_feed_messages(client.jetstream(), layout, id));
    jsStreamInfo* info = nullptr;
    REQUIRE(js_GetStreamInfo(&info, client.jetstream(), layout.feed_stream.c_str(), nullptr,
                             nullptr) == NATS_OK);
    const std::uint64_t stored = info->State.Msgs;
    jsStreamInfo_Destroy(info);
    CHECK(stored == live_messages);

    // The finished matches' latest states age out of the latest-state bucket; the live ones,
    // republished on every tick, stay.
    REQUIRE(eventually(
        [&] {
            for (const auto& [id, messages] : finished) {
                if (bucket_entry(latest.get(), id)) return false;
            }
            return true;
        },
        std::chrono::seconds(30 + kKeepS)));
    for (const auto& [id, messages] : live) CHECK(bucket_entry(latest.get(), id).has_value());

    // A take-over after all that: engine A dies, B rebuilds A's live matches from what the
    // stream still holds and publishes them; nothing for the retired matches.
    std::set<std::uint64_t> moved;
    for (const auto& [id, messages] : live) {
        if (owners.at(cluster::partition_of(layout, id)) == "engine-a") moved.insert(id);
    }
    REQUIRE_FALSE(moved.empty());
    collector.read_until([](const auto&) { return false; }, 1s);
    std::map<std::uint64_t, std::uint64_t> last_seq_before;
    for (const std::uint64_t id : moved) {
        const auto& got = collector.by_match()[id];
        REQUIRE_FALSE(got.empty());
        last_seq_before[id] = got.back().update.meta.output_seq;
    }
    a->signal(SIGKILL);
    REQUIRE(a->wait(10s).has_value());
    const auto killed_at = Clock::now();
    const auto republished = [&](const auto& got) {
        for (const std::uint64_t id : moved) {
            const auto it = got.find(id);
            if (it == got.end() || it->second.back().at <= killed_at ||
                it->second.back().update.meta.output_seq <= last_seq_before.at(id))
                return false;
        }
        return true;
    };
    collector.read_until(republished, 30s);
    REQUIRE(republished(collector.by_match()));
    collector.read_until([](const auto&) { return false; }, 1s);
    int wrong_live = 0, backwards = 0, after_retirement = 0;
    for (const std::uint64_t id : moved) {
        const auto& got = collector.by_match()[id];
        if (got.back().update.meta.input_seq != live.at(id).size()) ++wrong_live;
        for (std::size_t i = 1; i < got.size(); ++i) {
            if (got[i].update.meta.output_seq <= got[i - 1].update.meta.output_seq) ++backwards;
        }
    }
    for (const auto& [id, messages] : finished) {
        for (const auto& r : collector.by_match()[id]) after_retirement += r.at > killed_at;
    }
    CHECK(wrong_live == 0);
    CHECK(backwards == 0);
    CHECK(after_retirement == 0);
    for (const auto& [p, owner] : lease_owners(leases.get(), layout)) CHECK(owner == "engine-b");
    std::cout << "cluster retention: " << finished.size()
              << " finished matches retired and purged (" << stored << " messages left, all of the "
              << live.size() << " live matches); " << moved.size() << " live matches taken over"
              << std::endl;
    CHECK(b->stop() == std::optional<int>(0));
}
