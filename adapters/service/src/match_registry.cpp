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
    m.last_heard = now;
    m.dormant = false;
    if (limits_.max_messages_per_match != 0 && m.messages >= limits_.max_messages_per_match)
        return MessageOutcome::over_cap;
    ++m.messages;
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
    if (!m.ended_at && !m.live()) m.ended_at = now;
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
        auto& room = waiting_[id];
        auto& queue = room.messages;
        if ((queue.empty() && waiting_.size() > kMaxWaitingMatches) ||
            queue.size() >= kMaxWaitingPerMatch) {
            if (queue.empty()) waiting_.erase(id);
            return MessageOutcome::waiting_overflow;
        }
        if (queue.empty()) room.since = now;
        queue.push_back(message);
        ++waiting_count_;
        return MessageOutcome::waiting;
    }
    try {
        auto [it, inserted] = matches_.try_emplace(id, core::Match(id, *setup, params_));
        LiveMatch& created = it->second;
        if (clock_interpolation_) created.match.set_clock_interpolation(true);
        created.input_seq = message.header.source_seq;
        created.receive_time_us = receive_time_us;
        created.anchor_clock = created.match.priced_clock();
        created.anchor_time = now;
        created.last_heard = now;
        created.messages = 1;
    } catch (const std::invalid_argument& e) {
        last_setup_error_ = e.what();
        return MessageOutcome::bad_setup;
    }
    touched.push_back(id);
    if (auto queued = waiting_.find(id); queued != waiting_.end()) {
        LiveMatch& created = matches_.at(id);
        for (const core::InboundMessage& held : queued->second.messages)
            apply_to(created, held, receive_time_us, now);
        waiting_count_ -= queued->second.messages.size();
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

namespace {
void add_counters(core::MatchCounters& sum, const core::MatchCounters& c) {
    sum.accepted += c.accepted;
    sum.late += c.late;
    sum.duplicates += c.duplicates;
    sum.conflicting_duplicates += c.conflicting_duplicates;
    sum.rejected += c.rejected;
    for (std::size_t i = 0; i < sum.rejected_by_reason.size(); ++i) {
        sum.rejected_by_reason[i] += c.rejected_by_reason[i];
    }
}
}  // namespace

RetireReport MatchRegistry::retire(std::chrono::steady_clock::time_point now,
                                   const std::function<bool(LiveMatch&)>& before_forgetting) {
    RetireReport report;
    if (limits_.retention.count() > 0) {
        for (auto it = matches_.begin(); it != matches_.end();) {
            if (it->second.ended_at && now - *it->second.ended_at >= limits_.retention &&
                (!before_forgetting || before_forgetting(it->second))) {
                add_counters(retired_totals_, it->second.match.counters());
                it = matches_.erase(it);
                ++report.matches;
            } else {
                ++it;
            }
        }
    }
    if (limits_.waiting_ttl.count() > 0) {
        for (auto it = waiting_.begin(); it != waiting_.end();) {
            if (now - it->second.since >= limits_.waiting_ttl) {
                report.waiting_expired += it->second.messages.size();
                waiting_count_ -= it->second.messages.size();
                it = waiting_.erase(it);
            } else {
                ++it;
            }
        }
    }
    return report;
}

core::MatchCounters MatchRegistry::totals() const {
    core::MatchCounters sum = retired_totals_;
    for (const auto& [id, m] : matches_) add_counters(sum, m.match.counters());
    return sum;
}

}  // namespace liveprob::service
