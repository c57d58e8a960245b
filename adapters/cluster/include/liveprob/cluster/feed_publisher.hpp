// `send`'s cluster target: publishes feed messages to the feed stream, each on its match's
// partition subject with its message id (cluster_layout.hpp), and counts a message delivered
// only when the stream acknowledges it (after a quorum of replicas stored it). At most
// `window` messages wait for an acknowledgement at once; one not acknowledged within
// `resend_after` is published again under the same id (the stream drops a copy it holds, the
// fold drops one past the window), and after `give_up_after` without any acknowledgement the
// publisher stops, so the caller can say how many never were.
// The replies come to an inbox of this publisher's own, read on the caller's thread: no
// callbacks, no locks.
#pragma once

#include <chrono>
#include <cstdint>
#include <span>
#include <string>
#include <unordered_map>
#include <vector>

#include "liveprob/cluster/cluster_layout.hpp"
#include "liveprob/cluster/nats_client.hpp"
#include "liveprob/core/messages.hpp"

namespace liveprob::cluster {

struct FeedPublisherOptions {
    std::size_t window = 20'000;
    std::chrono::milliseconds resend_after{5'000};
    std::chrono::milliseconds give_up_after{30'000};
};

class FeedPublisher {
public:
    FeedPublisher(NatsClient& client, const ClusterLayout& layout,
                  const FeedPublisherOptions& options);
    FeedPublisher(const FeedPublisher&) = delete;
    FeedPublisher& operator=(const FeedPublisher&) = delete;

    // Publishes one encoded feed message; waits first while the window is full (reading
    // acknowledgements, resending what is overdue). Does nothing once the publisher gave up.
    void send(const core::MessageHeader& header, std::span<const std::uint8_t> bytes);
    // Waits until every message is acknowledged or the publisher gives up.
    void finish();

    std::uint64_t handed() const noexcept { return handed_; }
    std::uint64_t acknowledged() const noexcept { return acknowledged_; }
    // Acknowledged as already stored (a resend, or a message another run had sent).
    std::uint64_t duplicates() const noexcept { return duplicates_; }
    std::uint64_t resent() const noexcept { return resent_; }
    std::uint64_t unanswered() const noexcept { return handed_ - acknowledged_; }
    bool gave_up() const noexcept { return gave_up_; }
    // Why: the last error the stream answered, or silence.
    const std::string& give_up_reason() const noexcept { return give_up_reason_; }
    const std::vector<std::uint64_t>& handed_per_partition() const noexcept {
        return per_partition_;
    }

private:
    struct Waiting {
        std::string subject;
        std::string id;
        std::vector<std::uint8_t> bytes;
        std::chrono::steady_clock::time_point sent_at;
    };
    void publish(std::uint64_t token, const Waiting& w);
    // Reads replies for up to `wait` (0: only what has arrived), resends what is overdue, and
    // decides whether to give up.
    void pump(std::chrono::milliseconds wait);
    void take_reply(natsMsg* reply);
    void resend_overdue(std::chrono::steady_clock::time_point now);

    NatsClient& client_;
    ClusterLayout layout_;
    FeedPublisherOptions options_;
    std::string inbox_;  // replies come to inbox_ + "." + token
    SubscriptionHandle replies_;
    std::unordered_map<std::uint64_t, Waiting> waiting_;  // by reply token
    std::uint64_t next_token_ = 1;
    std::uint64_t handed_ = 0, acknowledged_ = 0, duplicates_ = 0, resent_ = 0;
    std::vector<std::uint64_t> per_partition_;
    std::chrono::steady_clock::time_point last_progress_;
    std::chrono::steady_clock::time_point last_resend_scan_;
    bool gave_up_ = false;
    std::string give_up_reason_;
    std::string last_error_;
};

}  // namespace liveprob::cluster
