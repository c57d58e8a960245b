#include "liveprob/transport/topics.hpp"

#include <algorithm>

namespace liveprob::transport {

MatchTopic match_topic(std::uint64_t match_id) noexcept {
    MatchTopic topic{};
    std::copy(kMatchTopicPrefix.begin(), kMatchTopicPrefix.end(), topic.begin());
    for (std::size_t i = topic.size(); i > kMatchTopicPrefix.size(); --i) {
        topic[i - 1] = static_cast<char>('0' + match_id % 10);
        match_id /= 10;
    }
    return topic;
}

}  // namespace liveprob::transport
