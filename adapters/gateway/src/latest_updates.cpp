#include "liveprob/gateway/latest_updates.hpp"

#include "liveprob/protocol/json_writer.hpp"

namespace liveprob::gateway {

namespace {
TimelinePoint point_of(const core::Outputs& o) {
    return TimelinePoint{o.clock.clock_ms, static_cast<std::uint8_t>(o.clock.period),
                         o.p_home,         o.p_draw,
                         o.p_away,         o.home_goals,
                         o.away_goals,     o.home_reds,
                         o.away_reds,      o.has_advance,
                         o.p_advance_home, o.p_advance_away};
}
bool same_score_and_cards(const TimelinePoint& a, const TimelinePoint& b) {
    return a.home_goals == b.home_goals && a.away_goals == b.away_goals &&
           a.home_reds == b.home_reds && a.away_reds == b.away_reds;
}
bool is_final(core::MatchStatus status) {
    return status == core::MatchStatus::finished || status == core::MatchStatus::abandoned;
}
}  // namespace

LatestUpdates::Accepted LatestUpdates::accept(const GatewayUpdate& update, Clock::time_point now) {
    auto [it, inserted] = matches_.try_emplace(update.match_id);
    Entry& entry = it->second;
    Arrival arrival = Arrival::first;
    if (!inserted) {
        if (update.output_seq <= entry.output_seq) return {Arrival::stale, nullptr};
        arrival = update.output_seq == entry.output_seq + 1 ? Arrival::next : Arrival::after_gap;
    }
    entry.output_seq = update.output_seq;
    entry.frame = std::make_shared<const std::string>(render_update_json(update));
    append_point(entry, point_of(update.outputs));
    if (!is_final(update.outputs.status)) {
        entry.final_since.reset();  // live again (a correction reopened it)
    } else if (!entry.final_since) {
        entry.final_since = now;
    }
    return {arrival, entry.frame};
}

std::size_t LatestUpdates::forget_finished(Clock::time_point now, Clock::duration retention) {
    return std::erase_if(matches_, [&](const auto& kv) {
        const auto& since = kv.second.final_since;
        return since && now - *since >= retention;
    });
}

void LatestUpdates::append_point(Entry& entry, const TimelinePoint& point) const {
    auto& line = entry.timeline;
    line.push_back(point);
    if (timeline_points_ < 4 || line.size() <= timeline_points_) return;
    // Thin the older half by dropping every second point, but keep every point where the score
    // or the cards change: those are the marks the chart must not lose.
    std::vector<TimelinePoint> kept;
    kept.reserve(line.size());
    const std::size_t half = line.size() / 2;
    for (std::size_t i = 0; i < line.size(); ++i) {
        const bool marks_change = i > 0 && !same_score_and_cards(line[i - 1], line[i]);
        if (i >= half || i % 2 == 0 || marks_change) kept.push_back(line[i]);
    }
    line.swap(kept);
}

Frame LatestUpdates::latest(std::uint64_t match_id) const {
    auto it = matches_.find(match_id);
    return it == matches_.end() ? nullptr : it->second.frame;
}

std::vector<std::pair<std::uint64_t, Frame>> LatestUpdates::all_latest() const {
    std::vector<std::pair<std::uint64_t, Frame>> out;
    out.reserve(matches_.size());
    for (const auto& [id, entry] : matches_) out.emplace_back(id, entry.frame);
    return out;
}

std::string LatestUpdates::render_state_json() const {
    std::string out;
    protocol::JsonWriter json(out);
    json.begin_object().member("kind", "state").key("matches").begin_array();
    for (const auto& [id, entry] : matches_) json.raw(*entry.frame);
    json.end_array().end_object();
    return out;
}

std::optional<std::string> LatestUpdates::render_timeline_json(std::uint64_t match_id) const {
    auto found = matches_.find(match_id);
    if (found == matches_.end()) return std::nullopt;
    std::string out;
    protocol::JsonWriter json(out);
    json.begin_object()
        .member("kind", "timeline")
        .member("match_id", match_id)
        .key("points")
        .begin_array();
    for (const auto& p : found->second.timeline) {
        json.begin_array()
            .value(static_cast<unsigned>(p.period))
            .value(p.clock_ms)
            .value(p.p_home)
            .value(p.p_draw)
            .value(p.p_away)
            .value(p.home_goals)
            .value(p.away_goals)
            .value(static_cast<unsigned>(p.home_reds))
            .value(static_cast<unsigned>(p.away_reds));
        if (p.has_advance) json.value(p.p_advance_home).value(p.p_advance_away);
        else json.null().null();
        json.end_array();
    }
    json.end_array().end_object();
    return out;
}

}  // namespace liveprob::gateway
