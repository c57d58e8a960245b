// The JetStream cluster the cluster mode relies on, as the test support starts it: three real
// nats-server processes on loopback. What the cluster mode builds on is checked here first:
// a publish acknowledged by a stream with three replicas survives the SIGKILL of the node that
// led the stream, and a resend under the same message id is not stored twice.
#include <nats/nats.h>
#include <catch2/catch.hpp>

#include <chrono>
#include <map>
#include <string>
#include <thread>
#include <vector>

#include "nats_cluster.hpp"
#include "test_env.hpp"

namespace {

using liveprob::test::NatsCluster;
using liveprob::test::scratch_dir;

struct Client {
    natsConnection* connection = nullptr;
    jsCtx* js = nullptr;
    explicit Client(const NatsCluster& cluster) {
        std::vector<std::string> urls;
        std::vector<const char*> servers;
        for (int i = 0; i < cluster.size(); ++i) urls.push_back(cluster.url(i));
        for (const auto& url : urls) servers.push_back(url.c_str());
        natsOptions* options = nullptr;
        REQUIRE(natsOptions_Create(&options) == NATS_OK);
        REQUIRE(natsOptions_SetServers(options, servers.data(), cluster.size()) == NATS_OK);
        natsOptions_SetMaxReconnect(options, -1);
        natsOptions_SetReconnectWait(options, 100);
        REQUIRE(natsConnection_Connect(&connection, options) == NATS_OK);
        natsOptions_Destroy(options);
        jsOptions js_options;
        jsOptions_Init(&js_options);
        js_options.Wait = 2000;
        REQUIRE(natsConnection_JetStream(&js, connection, &js_options) == NATS_OK);
    }
    ~Client() {
        jsCtx_Destroy(js);
        natsConnection_Destroy(connection);
    }
};

// Publishes until acknowledged (the same message id every time, so a resend of a message the
// stream already holds is answered as a duplicate, not stored again); returns the stream
// sequence the acknowledgement names, 0 if none came within `limit`.
std::uint64_t publish_until_acknowledged(jsCtx* js, const std::string& subject,
                                         const std::string& payload, const std::string& id,
                                         std::chrono::seconds limit) {
    const auto deadline = std::chrono::steady_clock::now() + limit;
    while (std::chrono::steady_clock::now() < deadline) {
        jsPubOptions options;
        jsPubOptions_Init(&options);
        options.MsgId = id.c_str();
        jsPubAck* ack = nullptr;
        if (js_Publish(&ack, js, subject.c_str(), payload.data(), static_cast<int>(payload.size()),
                       &options, nullptr) == NATS_OK) {
            const std::uint64_t sequence = ack->Sequence;
            jsPubAck_Destroy(ack);
            return sequence;
        }
        std::this_thread::sleep_for(std::chrono::milliseconds(50));
    }
    return 0;
}

}  // namespace

TEST_CASE("A three-replica stream keeps every acknowledged message when its leader is killed",
          "[sockets]") {
    const auto dir = scratch_dir("nats-cluster");
    NatsCluster cluster(dir);
    Client client(cluster);

    jsStreamConfig config;
    jsStreamConfig_Init(&config);
    config.Name = "durability_check";
    const char* subjects[] = {"durability.>"};
    config.Subjects = subjects;
    config.SubjectsLen = 1;
    config.Storage = js_FileStorage;
    config.Replicas = 3;
    config.Duplicates = 120LL * 1000 * 1000 * 1000;  // the duplicate window, in nanoseconds
    jsStreamInfo* created = nullptr;
    REQUIRE(js_AddStream(&created, client.js, &config, nullptr, nullptr) == NATS_OK);
    REQUIRE(created->Cluster != nullptr);
    REQUIRE(created->Cluster->ReplicasLen == 2);  // the leader's two followers
    jsStreamInfo_Destroy(created);

    std::map<std::uint64_t, std::string> acknowledged;  // stream sequence -> payload
    const auto publish_range = [&](int from, int to) {
        for (int i = from; i < to; ++i) {
            const std::string payload = "payload-" + std::to_string(i);
            const auto sequence = publish_until_acknowledged(
                client.js, "durability.p" + std::to_string(i % 4), payload,
                "id-" + std::to_string(i), std::chrono::seconds(15));
            if (sequence != 0) acknowledged[sequence] = payload;
        }
    };
    publish_range(0, 200);
    REQUIRE(acknowledged.size() == 200);

    jsStreamInfo* info = nullptr;
    REQUIRE(js_GetStreamInfo(&info, client.js, "durability_check", nullptr, nullptr) == NATS_OK);
    const int leader = cluster.node_named(info->Cluster->Leader);
    jsStreamInfo_Destroy(info);
    REQUIRE(leader >= 0);
    cluster.kill(leader);
    REQUIRE_FALSE(cluster.running(leader));

    publish_range(200, 400);
    // Two of three nodes are a quorum: every publish is acknowledged after a new leader is
    // elected.
    CHECK(acknowledged.size() == 400);

    // A resend of an acknowledged message inside the duplicate window is not stored again.
    jsPubOptions resend;
    jsPubOptions_Init(&resend);
    resend.MsgId = "id-7";
    jsPubAck* duplicate = nullptr;
    REQUIRE(js_Publish(&duplicate, client.js, "durability.p3", "payload-7", 9, &resend, nullptr) ==
            NATS_OK);
    CHECK(duplicate->Duplicate);
    jsPubAck_Destroy(duplicate);

    REQUIRE(js_GetStreamInfo(&info, client.js, "durability_check", nullptr, nullptr) == NATS_OK);
    CHECK(info->State.Msgs == 400);
    CHECK(cluster.node_named(info->Cluster->Leader) != leader);
    jsStreamInfo_Destroy(info);

    // Every acknowledged message is stored, at the sequence its acknowledgement named.
    int lost = 0;
    for (const auto& [sequence, payload] : acknowledged) {
        natsMsg* stored = nullptr;
        if (js_GetMsg(&stored, client.js, "durability_check", sequence, nullptr, nullptr) !=
            NATS_OK) {
            ++lost;
            continue;
        }
        const std::string data(natsMsg_GetData(stored),
                               static_cast<std::size_t>(natsMsg_GetDataLength(stored)));
        if (data != payload) ++lost;
        natsMsg_Destroy(stored);
    }
    CHECK(lost == 0);
}
