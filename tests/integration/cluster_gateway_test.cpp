// The gateway taking its updates from a NATS cluster instead of serve's PUB socket, over real
// processes: a three-node JetStream cluster, one engine, and a gateway started once half of each
// match has been played. A browser-less WebSocket client watching everything gets every match
// at once (the gateway read the latest-state bucket at start), then each match's updates up to
// its final one as the rest of the feed goes through the cluster.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <map>
#include <set>

#include "cluster_harness.hpp"
#include "fake_serve.hpp"
#include "web_clients.hpp"

using namespace liveprob;
using namespace liveprob::test;

namespace {

// The match id a gateway update frame names, or 0.
std::uint64_t match_of_frame(const std::string& frame) {
    const std::string key = R"("match_id":)";
    const auto at = frame.find(key);
    return at == std::string::npos ? 0 : std::stoull(frame.substr(at + key.size()));
}

}  // namespace

TEST_CASE("the gateway takes its updates from the cluster's match subjects and latest-state bucket",
          "[gateway][sockets]") {
    const auto dir = scratch_dir("cluster-gateway");
    NatsCluster nats(dir);
    cluster::ClusterLayout layout;
    auto engine = start_engine(dir, nats, "engine-g");
    cluster::NatsClient client(subscriber_servers(nats));
    const cluster::KvStoreHandle leases(open_bucket(client.jetstream(), layout.lease_bucket));
    wait_for_split(leases.get(), layout, {"engine-g"});

    const auto matches = invented_matches(4001, 6);
    std::vector<core::InboundMessage> first_half, second_half;
    for (const auto& [id, messages] : matches) {
        const auto half = messages.begin() + static_cast<std::ptrdiff_t>(messages.size() / 2);
        first_half.insert(first_half.end(), messages.begin(), half);
        second_half.insert(second_half.end(), half, messages.end());
    }
    run_send(dir, "first", nats, first_half);
    const cluster::KvStoreHandle latest(open_bucket(client.jetstream(), layout.latest_bucket));
    REQUIRE(eventually(
        [&] {
            for (const auto& [id, messages] : matches) {
                kvEntry* entry = nullptr;
                if (kvStore_Get(&entry, latest.get(), cluster::match_key(id).c_str()) != NATS_OK)
                    return false;
                kvEntry_Destroy(entry);
            }
            return true;
        },
        20s));

    gateway::GatewayConfig config;
    config.nats_servers = {nats.url(1), nats.url(2)};
    config.web_dir = source_dir() / "adapters" / "gateway" / "web";
    config.idle_timeout = std::chrono::seconds(20);
    config.handshake_timeout = std::chrono::seconds(5);
    RunningGateway gateway(config);
    WebSocketClient viewer(gateway.port());
    REQUIRE_FALSE(viewer.handshake_error());
    viewer.send(R"({"watch":"all"})");

    // Every match at once, from the bucket, as of half-time.
    std::set<std::uint64_t> caught_up;
    while (caught_up.size() < matches.size()) {
        const auto frame = viewer.receive_update(10s);
        REQUIRE(frame);
        const std::uint64_t id = match_of_frame(*frame);
        REQUIRE(matches.contains(id));
        CHECK(frame->find(fmt::format(R"("feed_seq":{},)", matches.at(id).size() / 2)) !=
              std::string::npos);
        caught_up.insert(id);
    }

    // Then the rest of each match, through the cluster, up to its final update.
    run_send(dir, "second", nats, second_half);
    std::map<std::uint64_t, bool> finished;
    while (finished.size() < matches.size()) {
        const auto frame = viewer.receive_update(20s);
        REQUIRE(frame);
        const std::uint64_t id = match_of_frame(*frame);
        REQUIRE(matches.contains(id));
        if (frame->find(fmt::format(R"("feed_seq":{},)", matches.at(id).size())) !=
            std::string::npos)
            finished[id] = true;
    }
    CHECK(gateway_counter(gateway.port(), "updates_rejected") == 0);
    CHECK(http_request("127.0.0.1", gateway.port(), "/health/ready").status == 200);
    CHECK(engine->stop() == std::optional<int>(0));
}
