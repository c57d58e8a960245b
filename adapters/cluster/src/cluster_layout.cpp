#include "liveprob/cluster/cluster_layout.hpp"

#include <fmt/format.h>

#include <charconv>

#include "liveprob/protocol/sharding.hpp"

namespace liveprob::cluster {
namespace {

std::optional<std::uint64_t> whole_number(std::string_view digits) {
    std::uint64_t value = 0;
    const auto [end, error] = std::from_chars(digits.data(), digits.data() + digits.size(), value);
    if (digits.empty() || error != std::errc() || end != digits.data() + digits.size())
        return std::nullopt;
    return value;
}

}  // namespace

std::uint32_t partition_of(const ClusterLayout& layout, std::uint64_t match_id) noexcept {
    return protocol::shard_of(match_id, layout.partitions);
}

std::string feed_subject(const ClusterLayout& layout, std::uint64_t match_id) {
    return fmt::format("{}.{}.{}", layout.feed_subject_prefix, partition_of(layout, match_id),
                       match_id);
}

std::string partition_subjects(const ClusterLayout& layout, std::uint32_t partition) {
    return fmt::format("{}.{}.*", layout.feed_subject_prefix, partition);
}

std::string feed_subjects(const ClusterLayout& layout) {
    return layout.feed_subject_prefix + ".*.*";
}

std::optional<std::uint64_t> match_of_feed_subject(std::string_view subject) {
    const auto dot = subject.rfind('.');
    if (dot == std::string_view::npos) return std::nullopt;
    return whole_number(subject.substr(dot + 1));
}

std::string update_subject(const ClusterLayout& layout, std::uint64_t match_id) {
    return fmt::format("{}.{}", layout.update_subject_prefix, match_id);
}

std::string match_key(std::uint64_t match_id) { return fmt::format("match.{}", match_id); }

std::optional<std::uint64_t> match_of_key(std::string_view key) {
    constexpr std::string_view prefix = "match.";
    if (!key.starts_with(prefix)) return std::nullopt;
    return whole_number(key.substr(prefix.size()));
}

std::string lease_key(std::uint32_t partition) { return fmt::format("partition.{}", partition); }

std::string feed_message_id(const core::MessageHeader& header) {
    return fmt::format("{}-{}", header.match_id, header.source_seq);
}

std::vector<std::string> split_servers(std::string_view servers) {
    std::vector<std::string> urls;
    while (!servers.empty()) {
        const auto comma = servers.find(',');
        const std::string_view piece = servers.substr(0, comma);
        if (!piece.empty()) urls.emplace_back(piece);
        if (comma == std::string_view::npos) break;
        servers.remove_prefix(comma + 1);
    }
    return urls;
}

bool is_nats_target(const std::vector<std::string>& endpoints) {
    if (endpoints.empty()) return false;
    for (const auto& e : endpoints) {
        if (e.rfind("nats://", 0) != 0) return false;
    }
    return true;
}

}  // namespace liveprob::cluster
