// The gateway's memory of every match it has seen: the latest frame (for late joiners and the
// HTTP state endpoint) and a bounded timeline of probabilities (for the page's chart).
#pragma once

#include <chrono>
#include <cstddef>
#include <cstdint>
#include <map>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "liveprob/gateway/update_json.hpp"

namespace liveprob::gateway {

struct TimelinePoint {
    std::uint32_t clock_ms = 0;
    std::uint8_t period = 0;
    double p_home = 0.0;
    double p_draw = 0.0;
    double p_away = 0.0;
    std::uint16_t home_goals = 0;
    std::uint16_t away_goals = 0;
    std::uint8_t home_reds = 0;
    std::uint8_t away_reds = 0;
    // To advance, in formats that need a winner (the page draws it from extra time on).
    bool has_advance = false;
    double p_advance_home = 0.0;
    double p_advance_away = 0.0;
};

using Frame = std::shared_ptr<const std::string>;

// How an arriving update relates to what is already held for its match.
enum class Arrival : std::uint8_t {
    first,      // first update seen for this match
    next,       // output_seq is the one after the latest
    after_gap,  // output_seq jumped: updates were missed (ask for a snapshot)
    stale,      // output_seq not newer than the latest: duplicate or late, ignored
};

class LatestUpdates {
public:
    using Clock = std::chrono::steady_clock;

    explicit LatestUpdates(std::size_t timeline_points) : timeline_points_(timeline_points) {}

    struct Accepted {
        Arrival arrival = Arrival::first;
        Frame frame;  // null when stale
    };
    // `now`: when it arrived; a finished or abandoned match's retention counts from its first
    // final update.
    Accepted accept(const GatewayUpdate& update, Clock::time_point now);

    // Forgets every match whose final update (finished or abandoned) came `retention` or more
    // before `now`; returns how many. Live matches are never forgotten.
    std::size_t forget_finished(Clock::time_point now, Clock::duration retention);

    // Latest frame of one match, or null.
    Frame latest(std::uint64_t match_id) const;
    // Every match's latest frame, in match-id order.
    std::vector<std::pair<std::uint64_t, Frame>> all_latest() const;

    // {"kind":"state","matches":[<frame>,...]}: every match held, finished ones included until
    // their retention ends (a page keeps showing a final result for a while).
    std::string render_state_json() const;
    // {"match_id":7,"points":[[period,clock_ms,p_home,p_draw,p_away,home_goals,away_goals,
    //  home_reds,away_reds,advance_home,advance_away],...]} (advance null where the format needs
    //  no winner) or nothing for an unknown match.
    std::optional<std::string> render_timeline_json(std::uint64_t match_id) const;

    std::size_t match_count() const noexcept { return matches_.size(); }

private:
    struct Entry {
        std::uint64_t output_seq = 0;
        Frame frame;
        std::vector<TimelinePoint> timeline;
        std::optional<Clock::time_point> final_since;  // set while finished or abandoned
    };
    void append_point(Entry& entry, const TimelinePoint& point) const;

    std::size_t timeline_points_;
    std::map<std::uint64_t, Entry> matches_;
};

}  // namespace liveprob::gateway
