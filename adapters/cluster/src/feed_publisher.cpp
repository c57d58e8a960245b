#include "liveprob/cluster/feed_publisher.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <string_view>

namespace liveprob::cluster {
namespace {

using Clock = std::chrono::steady_clock;
// How often the waiting messages are scanned for overdue ones.
constexpr auto kResendScan = std::chrono::milliseconds(100);

// A stream's reply to a publish: {"stream":"x", "seq":7}, {"stream":"x", "seq":7,
// "duplicate": true}, or {"error":{"code":503,"description":"..."}} (spacing varies).
struct PublishReply {
    bool stored = false;
    bool duplicate = false;
    std::string error;
};

// The text after `"key":` (spaces skipped), or empty when the key is absent.
std::string_view value_of(std::string_view text, std::string_view key) {
    const std::string quoted = fmt::format("\"{}\"", key);
    auto at = text.find(quoted);
    if (at == std::string_view::npos) return {};
    text.remove_prefix(at + quoted.size());
    while (!text.empty() && (text.front() == ' ' || text.front() == ':')) text.remove_prefix(1);
    return text;
}

PublishReply read_reply(std::string_view text) {
    PublishReply reply;
    if (!value_of(text, "error").empty()) {
        const auto description = value_of(text, "description");
        reply.error = description.size() > 1
                          ? std::string(description.substr(1, description.find('"', 1) - 1))
                          : std::string(text);
        return reply;
    }
    reply.stored = !value_of(text, "seq").empty();
    reply.duplicate = value_of(text, "duplicate").starts_with("true");
    if (!reply.stored) reply.error = std::string(text);
    return reply;
}

}  // namespace

FeedPublisher::FeedPublisher(NatsClient& client, const ClusterLayout& layout,
                             const FeedPublisherOptions& options)
    : client_(client), layout_(layout), options_(options), per_partition_(layout.partitions, 0) {
    natsInbox* inbox = nullptr;
    check(natsInbox_Create(&inbox), "reply inbox");
    inbox_ = inbox;
    natsInbox_Destroy(inbox);
    natsSubscription* sub = nullptr;
    check(natsConnection_SubscribeSync(&sub, client_.connection(), (inbox_ + ".*").c_str()),
          "subscribing to the reply inbox");
    replies_.reset(sub);
    // Room for a whole window of replies, with resends on top.
    natsSubscription_SetPendingLimits(sub, -1, -1);
    check(natsConnection_FlushTimeout(client_.connection(), 5000), "reply inbox");
    last_progress_ = last_resend_scan_ = Clock::now();
}

void FeedPublisher::publish(std::uint64_t token, const Waiting& w) {
    const std::string reply = fmt::format("{}.{}", inbox_, token);
    natsMsg* raw = nullptr;
    if (natsMsg_Create(&raw, w.subject.c_str(), reply.c_str(),
                       reinterpret_cast<const char*>(w.bytes.data()),
                       static_cast<int>(w.bytes.size())) != NATS_OK)
        return;  // stays waiting: resent when overdue
    MsgHandle message(raw);
    natsMsgHeader_Set(raw, "Nats-Msg-Id", w.id.c_str());
    // While the connection is down the client buffers it; a failure here only means it is
    // resent later.
    natsConnection_PublishMsg(client_.connection(), raw);
}

void FeedPublisher::send(const core::MessageHeader& header, std::span<const std::uint8_t> bytes) {
    if (gave_up_) return;
    while (waiting_.size() >= options_.window && !gave_up_) pump(std::chrono::milliseconds(50));
    if (gave_up_) return;
    const std::uint32_t partition = partition_of(layout_, header.match_id);
    Waiting w{feed_subject(layout_, header.match_id), feed_message_id(header),
              std::vector<std::uint8_t>(bytes.begin(), bytes.end()), Clock::now()};
    if (waiting_.empty()) last_progress_ = w.sent_at;  // silence counts from the first wait
    const std::uint64_t token = next_token_++;
    publish(token, w);
    waiting_.emplace(token, std::move(w));
    ++handed_;
    ++per_partition_[partition];
    pump(std::chrono::milliseconds(0));
}

void FeedPublisher::finish() {
    natsConnection_FlushTimeout(client_.connection(), 1000);
    while (!waiting_.empty() && !gave_up_) pump(std::chrono::milliseconds(50));
}

void FeedPublisher::pump(std::chrono::milliseconds wait) {
    natsMsg* reply = nullptr;
    if (natsSubscription_NextMsg(&reply, replies_.get(), wait.count()) == NATS_OK) {
        take_reply(reply);
        while (natsSubscription_NextMsg(&reply, replies_.get(), 0) == NATS_OK) take_reply(reply);
    }
    const auto now = Clock::now();
    if (now - last_resend_scan_ >= kResendScan) {
        last_resend_scan_ = now;
        resend_overdue(now);
    }
    if (!waiting_.empty() && now - last_progress_ >= options_.give_up_after) {
        gave_up_ = true;
        give_up_reason_ = fmt::format(
            "no acknowledgement for {} ms{}", options_.give_up_after.count(),
            last_error_.empty() ? "" : fmt::format(" (the stream last answered: {})", last_error_));
    }
}

void FeedPublisher::take_reply(natsMsg* raw) {
    MsgHandle reply(raw);
    const std::string_view subject = natsMsg_GetSubject(raw);
    const auto dot = subject.rfind('.');
    std::uint64_t token = 0;
    for (const char c : subject.substr(dot + 1))
        token = token * 10 + static_cast<unsigned>(c - '0');
    const auto it = waiting_.find(token);
    if (it == waiting_.end()) return;  // an answer to a copy already resent under a new token
    // No stream listens on the subject (yet): it stays waiting and is resent.
    if (natsMsg_IsNoResponders(raw)) {
        last_error_ = "no responders (is the stream there?)";
        return;
    }
    const PublishReply answer =
        read_reply({natsMsg_GetData(raw), static_cast<std::size_t>(natsMsg_GetDataLength(raw))});
    if (!answer.stored) {
        last_error_ = answer.error;
        return;
    }
    if (answer.duplicate) ++duplicates_;
    ++acknowledged_;
    waiting_.erase(it);
    last_progress_ = Clock::now();
}

void FeedPublisher::resend_overdue(Clock::time_point now) {
    std::vector<std::uint64_t> overdue;
    for (const auto& [token, w] : waiting_) {
        if (now - w.sent_at >= options_.resend_after) overdue.push_back(token);
    }
    std::sort(overdue.begin(), overdue.end());  // in their first order
    for (const std::uint64_t old_token : overdue) {
        auto node = waiting_.extract(old_token);
        node.key() = next_token_++;
        node.mapped().sent_at = now;
        publish(node.key(), node.mapped());
        waiting_.insert(std::move(node));
        ++resent_;
    }
}

}  // namespace liveprob::cluster
