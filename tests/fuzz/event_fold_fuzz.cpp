// Fuzz the match state machine: the bytes drive a sequence of inbound messages (any kind, any
// order, duplicates, nonsense values) into one match. Invariants checked after every message:
// no crash; every probability in [0, 1]; the three results, the next-goal split and the score
// grid each sum to 1 within 1e-9. At the end, the same messages folded in sequence-number
// order give the identical state.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <vector>

#include "liveprob/core/match.hpp"

namespace {

using namespace liveprob;

using namespace liveprob::core;

struct ByteReader {
    const std::uint8_t* data;
    std::size_t size;
    std::size_t pos = 0;
    bool empty() const { return pos >= size; }
    std::uint8_t next() { return pos < size ? data[pos++] : 0; }
    std::uint32_t next16() { return static_cast<std::uint32_t>(next()) << 8 | next(); }
};

void require(bool ok) {
    if (!ok) std::abort();
}

bool near_one(double x) { return std::abs(x - 1.0) < 1e-9; }

void check_outputs(const Outputs& o) {
    const double ps[] = {o.p_home,         o.p_draw,         o.p_away,
                         o.next_goal_home, o.next_goal_away, o.next_goal_none,
                         o.p_both_score,   o.p_advance_home, o.p_advance_away};
    for (double p : ps) require(p >= -1e-12 && p <= 1.0 + 1e-12);
    require(near_one(o.p_home + o.p_draw + o.p_away));
    require(near_one(o.next_goal_home + o.next_goal_away + o.next_goal_none));
    double grid = o.tail_mass;
    for (const auto& row : o.goals_added)
        for (double c : row) grid += c;
    require(near_one(grid));
    if (o.has_advance) require(near_one(o.p_advance_home + o.p_advance_away));
}

InboundMessage make_message(ByteReader& in, std::uint64_t match_id) {
    InboundMessage m;
    m.header.match_id = (in.next() == 0xff) ? match_id + 1 : match_id;  // sometimes another match
    m.header.source_seq = in.next() % 64;  // small range: duplicates and late arrivals happen
    m.header.clock.period = static_cast<Period>(in.next() % 8);  // includes an invalid value
    m.header.clock.clock_ms = in.next16() * 200u;                // 0 .. ~218 minutes
    const auto side = static_cast<Side>(in.next() % 3);          // includes an invalid side
    switch (in.next() % 13) {
        case 0: m.body = PeriodStart{static_cast<Period>(in.next() % 7)}; break;
        case 1: m.body = PeriodEnd{static_cast<Period>(in.next() % 7)}; break;
        case 2: m.body = Goal{side, (in.next() & 1) != 0, (in.next() & 1) != 0}; break;
        case 3: m.body = GoalCancelled{in.next() % 64u}; break;
        case 4: m.body = RedCard{side, (in.next() & 1) != 0}; break;
        case 5: m.body = CardRescinded{in.next() % 64u}; break;
        case 6:
            m.body = StoppageAnnounced{static_cast<Period>(in.next() % 7),
                                       static_cast<std::uint16_t>(in.next() % 40)};
            break;
        case 7:
            m.body = ScoreCorrection{static_cast<std::uint16_t>(in.next() % 20),
                                     static_cast<std::uint16_t>(in.next() % 20)};
            break;
        case 8: m.body = ShootoutKick{side, (in.next() & 1) != 0}; break;
        case 9: m.body = ShotXg{side, (in.next() - 20) / 100.0}; break;
        case 10: m.body = MatchAbandoned{"fuzz"}; break;
        case 11: m.body = FinalWhistle{}; break;
        default: m.body = ClockSync{(in.next() & 1) != 0}; break;
    }
    return m;
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
    if (size < 2) return 0;
    ByteReader in{data, size};
    MatchSetup setup;
    setup.home_name = "Home";
    setup.away_name = "Away";
    setup.prior = PriorMeans{0.2 + in.next() / 64.0, 0.2 + in.next() / 64.0};
    const std::uint8_t format = in.next();
    setup.format.extra_time = (format & 1) != 0;
    setup.format.shootout = (format & 2) != 0;
    if (format & 4)
        setup.format.first_leg = FirstLegResult{static_cast<std::uint16_t>(format >> 5 & 3),
                                                static_cast<std::uint16_t>(format >> 3 & 3)};

    constexpr std::uint64_t kMatch = 7;
    Match arrival_order(kMatch, setup);
    std::vector<InboundMessage> sent;
    while (!in.empty() && sent.size() < 200) {
        sent.push_back(make_message(in, kMatch));
        (void)arrival_order.apply(sent.back());
        check_outputs(arrival_order.outputs());
        require(arrival_order.outputs().home_goals < 1000 &&
                arrival_order.outputs().away_goals < 1000);
        if (in.next() % 4 == 0) {
            MatchClock later = sent.back().header.clock;
            later.clock_ms += 60'000;
            (void)arrival_order.advance_to(later);
            check_outputs(arrival_order.outputs());
        }
    }

    // The same messages sorted by sequence number (stable: copies of one sequence number keep
    // their relative order, so the same copy is the one that counts).
    std::vector<InboundMessage> ordered = sent;
    std::stable_sort(ordered.begin(), ordered.end(),
                     [](const InboundMessage& a, const InboundMessage& b) {
                         return a.header.source_seq < b.header.source_seq;
                     });
    Match in_order(kMatch, setup);
    for (const auto& m : ordered) (void)in_order.apply(m);
    require(in_order.state() == arrival_order.state());
    return 0;
}
