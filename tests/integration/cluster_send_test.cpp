// `send` into the cluster mode's feed stream on a real three-node JetStream cluster: every
// message acknowledged, stored once on its match's partition subject with its message id, a
// second send of the same feed stored nowhere again; and with the stream's quorum gone, send
// exits 1 saying how many were never acknowledged.
#include <catch2/catch.hpp>

#include <map>
#include <regex>
#include <set>

#include "live_service_harness.hpp"
#include "liveprob/cluster/cluster_layout.hpp"
#include "liveprob/cluster/nats_client.hpp"
#include "nats_cluster.hpp"

using namespace liveprob;
using namespace liveprob::test;

namespace {

std::vector<core::InboundMessage> feed_of_matches(std::uint64_t first_id, int count) {
    std::vector<core::InboundMessage> feed;
    for (std::uint64_t id = first_id; id < first_id + static_cast<std::uint64_t>(count); ++id) {
        const auto match = invented_match(id);
        feed.insert(feed.end(), match.begin(), match.end());
    }
    return feed;
}

std::vector<std::string> cluster_urls(const NatsCluster& nats) {
    std::vector<std::string> urls;
    for (int i = 0; i < nats.size(); ++i) urls.push_back(nats.url(i));
    return urls;
}

// Runs `liveprob send` to the cluster; returns its exit code and standard output.
std::pair<int, std::string> send_to_cluster(const std::filesystem::path& dir,
                                            const std::string& name, const NatsCluster& nats,
                                            const std::filesystem::path& feed,
                                            std::vector<std::string> extra = {}) {
    std::vector<std::string> argv{liveprob_binary().string(), "send", "--to", nats.urls(),
                                  feed.string()};
    argv.insert(argv.end(), extra.begin(), extra.end());
    ChildProcess send(argv, dir / (name + ".out"), dir / (name + ".err"));
    const auto code = send.wait(60s);
    REQUIRE(code.has_value());
    return {*code, send.output()};
}

std::uint64_t stream_messages(jsCtx* js, const std::string& stream) {
    jsStreamInfo* info = nullptr;
    cluster::check(js_GetStreamInfo(&info, js, stream.c_str(), nullptr, nullptr), "stream info");
    const std::uint64_t n = info->State.Msgs;
    jsStreamInfo_Destroy(info);
    return n;
}

}  // namespace

TEST_CASE(
    "send stores every feed message once in the cluster's stream, on its partition's "
    "subject, acknowledged",
    "[sockets]") {
    const auto dir = scratch_dir("cluster-send");
    NatsCluster nats(dir);
    const auto feed = feed_of_matches(501, 40);
    write_frames(dir / "feed.frames", feed);

    const auto [code, out] = send_to_cluster(dir, "first", nats, dir / "feed.frames");
    INFO(out);
    CHECK(code == 0);
    const std::string all = fmt::format("{} of {} acknowledged", feed.size(), feed.size());
    CHECK(out.find(all) != std::string::npos);

    const cluster::ClusterLayout layout;
    cluster::NatsClient client(cluster_urls(nats));
    REQUIRE(stream_messages(client.jetstream(), layout.feed_stream) == feed.size());

    // Each stored message: the bytes sent, on its match's partition subject, under its id.
    std::set<std::vector<std::uint8_t>> expected;
    for (const auto& m : feed) expected.insert(protocol::encode_feed_message(m));
    std::set<std::vector<std::uint8_t>> stored;
    int misplaced = 0;
    for (std::uint64_t seq = 1; seq <= feed.size(); ++seq) {
        natsMsg* raw = nullptr;
        cluster::check(
            js_GetMsg(&raw, client.jetstream(), layout.feed_stream.c_str(), seq, nullptr, nullptr),
            "stored message");
        cluster::MsgHandle message(raw);
        const auto* data = reinterpret_cast<const std::uint8_t*>(natsMsg_GetData(raw));
        std::vector<std::uint8_t> bytes(data, data + natsMsg_GetDataLength(raw));
        const auto decoded = protocol::decode_feed_message(bytes);
        REQUIRE(decoded.message);
        const auto& header = decoded.message->header;
        const char* id = nullptr;
        natsMsgHeader_Get(raw, "Nats-Msg-Id", &id);
        if (std::string(natsMsg_GetSubject(raw)) !=
                cluster::feed_subject(layout, header.match_id) ||
            id == nullptr || cluster::feed_message_id(header) != id)
            ++misplaced;
        stored.insert(std::move(bytes));
    }
    CHECK(misplaced == 0);
    CHECK(stored == expected);

    // The same feed again: acknowledged as already stored, nothing stored twice.
    const auto [again_code, again_out] = send_to_cluster(dir, "again", nats, dir / "feed.frames");
    INFO(again_out);
    CHECK(again_code == 0);
    CHECK(again_out.find(all) != std::string::npos);
    CHECK(again_out.find(fmt::format("({} of them already stored)", feed.size())) !=
          std::string::npos);
    CHECK(stream_messages(client.jetstream(), layout.feed_stream) == feed.size());
}

TEST_CASE("send exits 1 saying how many messages the cluster never acknowledged", "[sockets]") {
    const auto dir = scratch_dir("cluster-send-lost");
    NatsCluster nats(dir);
    write_frames(dir / "first.frames", feed_of_matches(601, 2));
    REQUIRE(send_to_cluster(dir, "first", nats, dir / "first.frames").first == 0);

    // Two of three nodes gone: the stream has no quorum and stores nothing.
    nats.kill(1);
    nats.kill(2);
    const auto lost = feed_of_matches(701, 3);
    write_frames(dir / "lost.frames", lost);
    const auto [code, out] =
        send_to_cluster(dir, "lost", nats, dir / "lost.frames",
                        {"--give-up-ms", "1500", "--resend-ms", "300", "--window", "1000"});
    INFO(out);
    CHECK(code == 1);
    CHECK(out.find(fmt::format("0 of {} acknowledged, {} never acknowledged", lost.size(),
                               lost.size())) != std::string::npos);
}
