#include "liveprob/clients/acked_sender.hpp"

#include <fmt/format.h>

#include <stdexcept>

#include "liveprob/protocol/sharding.hpp"

namespace liveprob::clients {

AckedSender::AckedSender(zmq::context_t& context, const std::vector<std::string>& ingest_endpoints,
                         const AckedSenderOptions& options)
    : options_(options) {
    if (ingest_endpoints.empty()) throw std::invalid_argument("no ingest endpoint to send to");
    if (ingest_endpoints.size() > 1024)
        throw std::invalid_argument("more than 1024 shard endpoints");
    if (options.window == 0) throw std::invalid_argument("the window must hold a message");
    shards_.reserve(ingest_endpoints.size());
    handed_per_shard_.assign(ingest_endpoints.size(), 0);
    for (const std::string& endpoint : ingest_endpoints) {
        Shard& shard = shards_.emplace_back();
        shard.endpoint = endpoint;
        shard.socket = zmq::socket_t(context, zmq::socket_type::dealer);
        shard.socket.set(zmq::sockopt::linger, 0);  // what matters is acknowledged, not queued
        // Nothing queued towards a connection that is not up: a dead service's queue would be
        // lost with it. The window is the queue, and it is resent from.
        shard.socket.set(zmq::sockopt::immediate, 1);
        shard.socket.set(zmq::sockopt::sndhwm, 100'000);
        apply_curve_client(shard.socket, options.keys);
        shard.socket.connect(endpoint);
    }
}

bool AckedSender::send(std::uint64_t match_id, std::span<const std::uint8_t> bytes) {
    ++handed_;
    if (gave_up_) return false;
    Shard& shard = shards_[protocol::shard_of(match_id, shard_count())];
    while (shard.window.size() >= options_.window) {
        pump(std::chrono::milliseconds(50));
        if (gave_up_) return false;
    }
    if (shard.outstanding == 0) shard.last_answer = Clock::now();
    shard.window.push_back({std::vector<std::uint8_t>(bytes.begin(), bytes.end())});
    ++shard.outstanding;
    ++handed_per_shard_[static_cast<std::size_t>(&shard - shards_.data())];
    // Out before the caller reads on (a live feed's next line may be minutes away): while the
    // connection is down this waits, as a full queue would, until it is up or the sender gives
    // up.
    flush(shard);
    pump(std::chrono::milliseconds(0));
    while (!gave_up_ && shard.next_unsent < shard.window.size())
        pump(std::chrono::milliseconds(50));
    return !gave_up_;
}

bool AckedSender::finish() {
    const auto waiting = [this] {
        for (const Shard& s : shards_) {
            if (s.outstanding > 0) return true;
        }
        return false;
    };
    while (!gave_up_ && waiting()) pump(std::chrono::milliseconds(50));
    return !gave_up_ && unanswered() == 0;
}

void AckedSender::pump(std::chrono::milliseconds wait) {
    std::vector<zmq::pollitem_t> items;
    items.reserve(shards_.size());
    for (Shard& s : shards_) items.push_back({s.socket.handle(), 0, ZMQ_POLLIN, 0});
    zmq::poll(items.data(), items.size(), wait);
    const auto now = Clock::now();
    for (Shard& s : shards_) {
        read_answers(s);
        flush(s);
        check_time(s, now);
    }
}

void AckedSender::flush(Shard& shard) {
    while (shard.next_unsent < shard.window.size()) {
        Pending& p = shard.window[shard.next_unsent];
        if (!p.answered) {
            const auto ticket = protocol::encode_delivery_ticket(shard.base + shard.next_unsent);
            // Not connected (or the socket's queue is full): try again on the next pump.
            if (!shard.socket.send(zmq::const_buffer(ticket.data(), ticket.size()),
                                   zmq::send_flags::sndmore | zmq::send_flags::dontwait))
                return;
            // The first frame is queued, so the second is accepted too (ZeroMQ queues a
            // multipart message whole).
            shard.socket.send(zmq::const_buffer(p.bytes.data(), p.bytes.size()),
                              zmq::send_flags::none);
            if (p.sent) ++resent_;
            p.sent = true;
        }
        ++shard.next_unsent;
    }
}

void AckedSender::read_answers(Shard& shard) {
    for (;;) {
        zmq::message_t message;
        if (!shard.socket.recv(message, zmq::recv_flags::dontwait)) break;
        if (message.more()) {  // an answer is one frame; skip the rest
            ++bad_acks_;
            while (message.more() && shard.socket.recv(message, zmq::recv_flags::dontwait)) {}
            continue;
        }
        const auto ack =
            protocol::decode_ingest_ack({message.data<std::uint8_t>(), message.size()});
        if (!ack.ok()) {
            ++bad_acks_;
            continue;
        }
        for (const auto& r : ack.value->durable) apply(shard, r, true);
        for (const auto& r : ack.value->refused) apply(shard, r, false);
    }
    // Answered messages leave the window from the front.
    while (!shard.window.empty() && shard.window.front().answered) {
        shard.window.pop_front();
        ++shard.base;
        if (shard.next_unsent > 0) --shard.next_unsent;
    }
}

void AckedSender::apply(Shard& shard, const protocol::TicketRange& range, bool durable) {
    const std::uint64_t end = shard.base + shard.window.size();  // one past the newest ticket
    const std::uint64_t first = std::max(range.first, shard.base);
    const std::uint64_t last = std::min(range.last, end == 0 ? 0 : end - 1);
    for (std::uint64_t t = first; t <= last && t < end; ++t) {
        Pending& p = shard.window[t - shard.base];
        if (p.answered || !p.sent) continue;  // answered before, or a number never sent
        p.answered = true;
        p.bytes = {};
        --shard.outstanding;
        ++(durable ? durable_ : refused_);
        shard.last_answer = Clock::now();
    }
}

void AckedSender::check_time(Shard& shard, Clock::time_point now) {
    if (shard.outstanding == 0) return;
    const auto silent = now - shard.last_answer;
    if (silent >= options_.give_up_after) {
        gave_up_ = true;
        if (give_up_reason_.empty()) {
            give_up_reason_ = fmt::format(
                "no acknowledgement from {} for {} ms (is serve running there, with this "
                "feed's key on its allow-list and this server key?)",
                shard.endpoint, options_.give_up_after.count());
        }
        return;
    }
    if (silent >= options_.resend_after && now - shard.last_resend >= options_.resend_after) {
        // Lost with a connection, or an answer lost: send every unanswered message again.
        shard.last_resend = now;
        shard.next_unsent = 0;
        flush(shard);
    }
}

}  // namespace liveprob::clients
