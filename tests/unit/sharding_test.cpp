#include <catch2/catch.hpp>

#include <array>
#include <cstdlib>

#include "liveprob/protocol/sharding.hpp"

using namespace liveprob::protocol;

TEST_CASE("every match has exactly one owning shard", "[sharding]") {
    for (std::uint32_t n : {1u, 2u, 3u, 7u}) {
        for (std::uint64_t id = 0; id < 2000; ++id) {
            int owners = 0;
            for (std::uint32_t k = 0; k < n; ++k) owners += owns({k, n}, id) ? 1 : 0;
            REQUIRE(owners == 1);
        }
    }
}

TEST_CASE("consecutive match ids spread evenly over shards", "[sharding]") {
    // 30,000 consecutive ids over 3 shards: each share within 2% of a third.
    std::array<int, 3> counts{};
    for (std::uint64_t id = 1; id <= 30000; ++id) ++counts[shard_of(id, 3)];
    for (int c : counts) CHECK(std::abs(c - 10000) < 200);
}

TEST_CASE("shard specs parse or name their problem", "[sharding]") {
    CHECK(parse_shard_spec("0/3") == ShardSpec{0, 3});
    CHECK(parse_shard_spec("2/3") == ShardSpec{2, 3});
    CHECK_THROWS_WITH(parse_shard_spec("3/3"), Catch::Contains("K must be below N"));
    CHECK_THROWS_WITH(parse_shard_spec("1"), Catch::Contains("no '/'"));
    CHECK_THROWS_WITH(parse_shard_spec("a/3"), Catch::Contains("whole numbers"));
    CHECK_THROWS_WITH(parse_shard_spec("0/0"), Catch::Contains("1..1024"));
    CHECK_THROWS_WITH(parse_shard_spec("0/3x"), Catch::Contains("whole numbers"));
}
