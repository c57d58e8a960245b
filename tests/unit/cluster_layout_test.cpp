// The cluster's names: a match's feed subject sits under its partition (so an engine reads a
// partition with one wildcard and purges one match with one subject), and the match id is read
// back from a subject or a bucket key exactly, anything else refused.
#include <catch2/catch.hpp>

#include "liveprob/cluster/cluster_layout.hpp"
#include "liveprob/protocol/sharding.hpp"

using namespace liveprob;

TEST_CASE("cluster layout: a match's feed subject names its partition and its id", "[unit]") {
    cluster::ClusterLayout layout;
    layout.partitions = 16;
    for (const std::uint64_t id : {0ULL, 7ULL, 3001ULL, 18'446'744'073'709'551'615ULL}) {
        const std::string subject = cluster::feed_subject(layout, id);
        CHECK(subject == "liveprob.feed." + std::to_string(protocol::shard_of(id, 16)) + "." +
                             std::to_string(id));
        CHECK(cluster::match_of_feed_subject(subject) == id);
        CHECK(cluster::match_of_key(cluster::match_key(id)) == id);
    }
    CHECK(cluster::partition_subjects(layout, 3) == "liveprob.feed.3.*");
    CHECK(cluster::feed_subjects(layout) == "liveprob.feed.*.*");
}

TEST_CASE("cluster layout: a subject or key naming no match id is refused", "[unit]") {
    for (const char* subject : {"liveprob.feed.3.", "liveprob.feed.3.12x", "liveprob.feed.3.-1",
                                "liveprob.feed.3.99999999999999999999", "nodots"}) {
        INFO(subject);
        CHECK_FALSE(cluster::match_of_feed_subject(subject).has_value());
    }
    for (const char* key : {"match.", "match.1a", "partition.3", "matchx.4", ""}) {
        INFO(key);
        CHECK_FALSE(cluster::match_of_key(key).has_value());
    }
}
