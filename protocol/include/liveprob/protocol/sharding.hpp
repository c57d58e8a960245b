// Which engine shard owns a match. Part of the wire contract: `serve --shard K/N`, `send` and
// `relay` must agree, so the mapping is a fixed function of the match id alone.
#pragma once

#include <cstdint>
#include <stdexcept>
#include <string>

namespace liveprob::protocol {

struct ShardSpec {
    std::uint32_t index = 0;  // K, 0-based
    std::uint32_t count = 1;  // N
    friend bool operator==(const ShardSpec&, const ShardSpec&) = default;
};

// splitmix64's finaliser: consecutive match ids spread evenly over shards (a plain modulo would
// put every league's consecutive ids in lock-step).
constexpr std::uint64_t mix_match_id(std::uint64_t x) noexcept {
    x += 0x9e3779b97f4a7c15ULL;
    x = (x ^ (x >> 30)) * 0xbf58476d1ce4e5b9ULL;
    x = (x ^ (x >> 27)) * 0x94d049bb133111ebULL;
    return x ^ (x >> 31);
}

constexpr std::uint32_t shard_of(std::uint64_t match_id, std::uint32_t shard_count) noexcept {
    return shard_count <= 1 ? 0u : static_cast<std::uint32_t>(mix_match_id(match_id) % shard_count);
}

constexpr bool owns(const ShardSpec& spec, std::uint64_t match_id) noexcept {
    return shard_of(match_id, spec.count) == spec.index;
}

// Parses "K/N" (0 <= K < N <= 1024). Throws std::invalid_argument naming the problem.
ShardSpec parse_shard_spec(const std::string& text);

}  // namespace liveprob::protocol
