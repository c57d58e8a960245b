// The cluster mode at the size the cluster issue names: three NATS nodes, three engines
// (`serve --cluster`) sharing the partitions, 300 invented matches in play at once (their
// messages interleaved, one round of every match at a time), and a NATS subscriber on every
// match subject. Every update of every match arrives exactly once, in order, equal to what the
// in-process engine computes for that match. No timed assertions: deadlines only bound a hung
// run; how long the feed and its updates took is printed (ctest -V).
#include <catch2/catch.hpp>

#include <iostream>

#include "cluster_harness.hpp"

using namespace liveprob;
using namespace liveprob::test;

TEST_CASE(
    "three cluster engines, 300 concurrent matches: every update once, in order, as the "
    "in-process engine computes it",
    "[sockets]") {
    constexpr int kMatches = 300;
    const auto dir = scratch_dir("cluster-300");
    NatsCluster nats(dir);
    cluster::ClusterLayout layout;
    cluster::NatsClient client(subscriber_servers(nats));
    UpdateCollector collector(client, layout);
    const std::set<std::string> names = {"engine-a", "engine-b", "engine-c"};
    std::vector<std::unique_ptr<ChildProcess>> engines;
    // The default lease (5 s): nothing fails in this run, and on this shared two-core machine a
    // burst can keep an engine busy past the failover tests' 1.5 s, moving partitions (which
    // the failover tests cover) instead of showing the steady state.
    for (const auto& name : names) engines.push_back(start_engine(dir, nats, name, 5000));
    cluster::KvStoreHandle leases(open_bucket(client.jetstream(), layout.lease_bucket));
    const auto owners = wait_for_split(leases.get(), layout, names);
    std::set<std::string> working;
    for (const auto& [p, owner] : owners) working.insert(owner);
    REQUIRE(working == names);

    // Round r of the feed is message r of every match that has one.
    const auto matches = invented_matches(30'001, kMatches);
    std::map<std::uint64_t, std::vector<ReferenceOutput>> expected;
    std::size_t updates = 0, longest = 0;
    for (const auto& [id, messages] : matches) {
        expected[id] = engine_outputs(messages);
        updates += expected[id].size();
        longest = std::max(longest, messages.size());
    }
    std::vector<core::InboundMessage> feed;
    for (std::size_t round = 0; round < longest; ++round) {
        for (const auto& [id, messages] : matches) {
            if (round < messages.size()) feed.push_back(messages[round]);
        }
    }

    const auto started = Clock::now();
    run_send(dir, "feed", nats, feed);
    const auto sent = Clock::now();
    collector.read_count(updates, 120s);
    const auto delivered = Clock::now();
    collector.read_until([](const auto&) { return false; }, 1s);  // anything more arrives now

    int missing = 0, extra = 0, wrong = 0, out_of_order = 0;
    for (const auto& [id, want] : expected) {
        const auto& got = collector.by_match()[id];
        if (got.size() < want.size()) missing += static_cast<int>(want.size() - got.size());
        if (got.size() > want.size()) extra += static_cast<int>(got.size() - want.size());
        for (std::size_t i = 0; i < std::min(got.size(), want.size()); ++i) {
            if (got[i].update.meta.input_seq != want[i].input_seq ||
                !same_outputs(got[i].update.outputs, want[i].outputs))
                ++wrong;
            if (got[i].update.meta.output_seq != i + 1) ++out_of_order;
        }
    }
    const auto seconds = [](auto d) { return std::chrono::duration<double>(d).count(); };
    std::cout << "cluster, 3 engines: " << feed.size() << " messages of " << kMatches
              << " matches sent (acknowledged) in " << seconds(sent - started) << " s; " << updates
              << " updates all delivered " << seconds(delivered - started)
              << " s after the first send" << std::endl;
    CHECK(missing == 0);
    CHECK(extra == 0);
    CHECK(wrong == 0);
    CHECK(out_of_order == 0);
    for (auto& engine : engines) CHECK(engine->stop() == std::optional<int>(0));
}
