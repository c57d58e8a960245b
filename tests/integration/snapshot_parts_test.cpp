// serve's snapshot of every live match in parts, over real sockets: with more live matches than
// one part holds, a client's request and the gateway's start-up snapshot both get every match,
// the gateway reading the reply's frames one by one.
#include <catch2/catch.hpp>

#include <fmt/format.h>

#include <chrono>
#include <set>

#include "fake_serve.hpp"
#include "feed_builder.hpp"
#include "live_stack.hpp"
#include "liveprob/clients/snapshot_client.hpp"

using namespace liveprob;
using namespace std::chrono_literals;

TEST_CASE("a snapshot of more live matches than one frame holds arrives whole, in parts",
          "[integration][sockets][snapshot]") {
    const auto dir = test::scratch_dir("snapshot-parts");
    test::LiveStack stack(dir);
    // Enough matches for three parts (each part holds protocol::kSnapshotUpdatesPerPart).
    const std::uint64_t matches = 2 * protocol::kSnapshotUpdatesPerPart + 60;
    for (std::uint64_t id = 1; id <= matches; ++id) {
        test::FeedBuilder feed(id);
        core::MatchSetup setup;
        setup.home_name = fmt::format("Quarry Town {}", id);
        setup.away_name = fmt::format("Saltmarsh {}", id);
        setup.prior = core::PriorMeans{1.4, 1.1};
        stack.send(feed.next(setup, core::MatchClock{}));
    }
    // (What serve publishes meanwhile passes the recorder's queue: ask for the state instead.)
    zmq::context_t context(1);
    protocol::SnapshotReplyContents reply;
    REQUIRE(test::eventually(
        [&] {
            reply = clients::request_snapshot(context, stack.snapshot_endpoint(), 0, 30s);
            return reply.updates.size() == matches;
        },
        30s, 200ms));
    CHECK(reply.error.empty());
    std::set<std::uint64_t> ids;
    for (const auto& u : reply.updates) ids.insert(u.meta.match_id);
    CHECK(ids.size() == matches);  // each once
    CHECK(*ids.begin() == 1);
    CHECK(*ids.rbegin() == matches);

    // A gateway started now knows the matches only from its start-up snapshot (serve ticks once
    // an hour here).
    const std::uint16_t port = stack.start_gateway();
    REQUIRE(test::eventually([&] { return test::gateway_counter(port, "matches") == matches; }, 30s,
                             200ms));
    CHECK(test::gateway_counter(port, "snapshot_parts") == 3);
    CHECK(test::gateway_counter(port, "snapshot_failures") == 0);
}
