// Publish topics (the first frame of every message on the PUB socket; see protocol/README.md
// "Topics"). Match topics have a fixed width, so subscribing to one match's topic never also
// matches another id by prefix.
#pragma once

#include <array>
#include <cstdint>
#include <string>
#include <string_view>

namespace liveprob::transport {

inline constexpr std::string_view kMatchTopicPrefix =
    "match.";  // subscribe to this for every match
inline constexpr std::string_view kCountersTopic = "service.counters";
inline constexpr std::size_t kMatchTopicLength = kMatchTopicPrefix.size() + 20;

// "match." followed by the id as 20 decimal digits, zero-padded.
using MatchTopic = std::array<char, kMatchTopicLength>;
MatchTopic match_topic(std::uint64_t match_id) noexcept;
inline std::string match_topic_string(std::uint64_t match_id) {
    const MatchTopic t = match_topic(match_id);
    return std::string(t.data(), t.size());
}

}  // namespace liveprob::transport
