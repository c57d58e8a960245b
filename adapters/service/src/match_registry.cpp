#include "liveprob/service/match_registry.hpp"

#include <stdexcept>
#include <variant>

namespace liveprob::service {

bool LiveMatch::live() const noexcept {
    const core::MatchStatus s = match.state().status;
    return s != core::MatchStatus::finished && s != core::MatchStatus::abandoned;
}

LiveMatch* MatchRegistry::find(std::uint64_t match_id) {
    const auto it = matches_.find(match_id);
    return it == matches_.end() ? nullptr : &it->second;
}

MessageOutcome MatchRegistry::apply_to(LiveMatch& m, const core::InboundMessage& message,
                                       std::int64_t receive_time_us,
                                       std::chrono::steady_clock::time_point now) {
    const core::ApplyResult result = m.match.apply(message);
    switch (result.verdict) {
        case core::Verdict::duplicate: return MessageOutcome::duplicate;
        case core::Verdict::rejected: return MessageOutcome::rejected;
        case core::Verdict::accepted:
        case core::Verdict::late: break;
    }
    m.input_seq = message.header.source_seq;
    m.receive_time_us = receive_time_us;
    m.anchor_clock = m.match.priced_clock();
    m.anchor_time = now;
    return MessageOutcome::applied;
}

MessageOutcome MatchRegistry::handle(const core::InboundMessage& message,
                                     std::int64_t receive_time_us,
                                     std::chrono::steady_clock::time_point now,
                                     std::vector<std::uint64_t>& touched) {
    const std::uint64_t id = message.header.match_id;
    if (LiveMatch* m = find(id)) {
        const MessageOutcome outcome = apply_to(*m, message, receive_time_us, now);
        if (outcome == MessageOutcome::applied) touched.push_back(id);
        return outcome;
    }
    const auto* setup = std::get_if<core::MatchSetup>(&message.body);
    if (setup == nullptr) {
        auto& queue = waiting_[id];
        if ((queue.empty() && waiting_.size() > kMaxWaitingMatches) ||
            queue.size() >= kMaxWaitingPerMatch) {
            if (queue.empty()) waiting_.erase(id);
            return MessageOutcome::waiting_overflow;
        }
        queue.push_back(message);
        ++waiting_count_;
        return MessageOutcome::waiting;
    }
    try {
        auto [it, inserted] = matches_.try_emplace(id, core::Match(id, *setup, params_));
        LiveMatch& created = it->second;
        created.input_seq = message.header.source_seq;
        created.receive_time_us = receive_time_us;
        created.anchor_clock = created.match.priced_clock();
        created.anchor_time = now;
    } catch (const std::invalid_argument& e) {
        last_setup_error_ = e.what();
        return MessageOutcome::bad_setup;
    }
    touched.push_back(id);
    if (auto queued = waiting_.find(id); queued != waiting_.end()) {
        LiveMatch& created = matches_.at(id);
        for (const core::InboundMessage& held : queued->second)
            apply_to(created, held, receive_time_us, now);
        waiting_count_ -= queued->second.size();
        waiting_.erase(queued);
    }
    return MessageOutcome::created;
}

bool MatchRegistry::advance(LiveMatch& m, std::chrono::steady_clock::time_point now) {
    const auto elapsed =
        std::chrono::duration_cast<std::chrono::milliseconds>(now - m.anchor_time).count();
    if (elapsed <= 0) return false;
    core::MatchClock target = m.anchor_clock;
    const std::uint64_t ms =
        static_cast<std::uint64_t>(target.clock_ms) + static_cast<std::uint64_t>(elapsed);
    target.clock_ms = static_cast<std::uint32_t>(std::min<std::uint64_t>(ms, 0xFFFF'FFFFu));
    return m.match.advance_to(target);
}

core::MatchCounters MatchRegistry::totals() const {
    core::MatchCounters sum;
    for (const auto& [id, m] : matches_) {
        const core::MatchCounters& c = m.match.counters();
        sum.accepted += c.accepted;
        sum.late += c.late;
        sum.duplicates += c.duplicates;
        sum.conflicting_duplicates += c.conflicting_duplicates;
        sum.rejected += c.rejected;
        for (std::size_t i = 0; i < sum.rejected_by_reason.size(); ++i) {
            sum.rejected_by_reason[i] += c.rejected_by_reason[i];
        }
    }
    return sum;
}

}  // namespace liveprob::service
