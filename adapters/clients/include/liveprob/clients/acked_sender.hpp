// Acknowledged sending to engine shards: one DEALER per shard's ingest endpoint (shard order,
// 0/N first), each message to the shard owning its match, sent as [DeliveryTicket][FeedMessage]
// (protocol/ingest_ack_codec.hpp). The service answers with ticket ranges once the messages are
// journaled under its sync policy. Each shard keeps at most `window` messages unacknowledged;
// what gets no answer for `resend_after` is sent again (the service's fold drops duplicates),
// and after `give_up_after` without any answer the sender stops and says why. Messages are
// never queued towards a dead connection (ZMQ_IMMEDIATE): the window is the only queue.
#pragma once

#include <chrono>
#include <cstdint>
#include <deque>
#include <span>
#include <string>
#include <vector>

#include <zmq.hpp>

#include "liveprob/clients/curve_client.hpp"
#include "liveprob/protocol/ingest_ack_codec.hpp"

namespace liveprob::clients {

struct AckedSenderOptions {
    std::size_t window = 20'000;  // unacknowledged messages per shard
    std::chrono::milliseconds resend_after{5'000};
    std::chrono::milliseconds give_up_after{30'000};
    CurveClientKeys keys;
};

class AckedSender {
public:
    // Throws std::invalid_argument for an empty list, more than 1,024 endpoints or a zero window.
    AckedSender(zmq::context_t& context, const std::vector<std::string>& ingest_endpoints,
                const AckedSenderOptions& options);

    // Hands one encoded feed message of `match_id` to its shard, first waiting for room in that
    // shard's window, and returns once it is on the socket (so a feed that reads on slowly has
    // sent everything it read). False once the sender has given up (counted, not sent).
    bool send(std::uint64_t match_id, std::span<const std::uint8_t> bytes);
    // Waits until every message is answered, or the sender gives up. True when all were.
    bool finish();

    std::uint64_t handed() const noexcept { return handed_; }      // messages given to send()
    std::uint64_t durable() const noexcept { return durable_; }    // acknowledged as journaled
    std::uint64_t refused() const noexcept { return refused_; }    // acknowledged as refused
    std::uint64_t resent() const noexcept { return resent_; }      // sends after the first
    std::uint64_t bad_acks() const noexcept { return bad_acks_; }  // answers that failed to decode
    std::uint64_t unanswered() const noexcept { return handed_ - durable_ - refused_; }
    // Messages given to send() per shard, in shard order.
    const std::vector<std::uint64_t>& handed_per_shard() const noexcept {
        return handed_per_shard_;
    }
    bool gave_up() const noexcept { return gave_up_; }
    const std::string& give_up_reason() const noexcept { return give_up_reason_; }
    std::uint32_t shard_count() const noexcept {
        return static_cast<std::uint32_t>(shards_.size());
    }

private:
    using Clock = std::chrono::steady_clock;
    struct Pending {
        std::vector<std::uint8_t> bytes;
        bool answered = false;
        bool sent = false;
    };
    struct Shard {
        std::string endpoint;
        zmq::socket_t socket;
        std::deque<Pending> window;   // tickets base, base + 1, ...
        std::uint64_t base = 1;       // ticket of window.front()
        std::size_t next_unsent = 0;  // index of the first message not (re)sent yet
        std::uint64_t outstanding = 0;
        Clock::time_point last_answer{};  // or when the window last became non-empty
        Clock::time_point last_resend{};
    };

    // Sends what is unsent, reads answers (waiting at most `wait`), resends and gives up by
    // the clock.
    void pump(std::chrono::milliseconds wait);
    void flush(Shard& shard);
    void read_answers(Shard& shard);
    void apply(Shard& shard, const protocol::TicketRange& range, bool durable);
    void check_time(Shard& shard, Clock::time_point now);

    AckedSenderOptions options_;
    std::vector<Shard> shards_;
    std::vector<std::uint64_t> handed_per_shard_;
    std::uint64_t handed_ = 0, durable_ = 0, refused_ = 0, resent_ = 0, bad_acks_ = 0;
    bool gave_up_ = false;
    std::string give_up_reason_;
};

}  // namespace liveprob::clients
