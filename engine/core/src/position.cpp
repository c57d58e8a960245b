#include "liveprob/core/position.hpp"

#include <cmath>
#include <stdexcept>
#include <string>

#include "liveprob/core/match_state.hpp"

namespace liveprob::core {

namespace {

constexpr std::uint64_t kPositionMatchId = 1;

struct Builder {
    std::uint64_t match_id;
    std::vector<InboundMessage> messages;

    void add(MessageBody body, MatchClock clock) {
        InboundMessage m;
        m.header.match_id = match_id;
        m.header.source_seq = messages.size() + 1;
        m.header.clock = clock;
        m.body = std::move(body);
        messages.push_back(std::move(m));
    }
};

double expected_stoppage(const ModelParams& params, Period p) {
    switch (p) {
        case Period::first_half: return params.timing.expected_stoppage_first;
        case Period::second_half: return params.timing.expected_stoppage_second;
        default: return params.timing.expected_stoppage_extra;
    }
}

std::uint32_t played_end_ms(const CompetitionFormat& format, const ModelParams& params, Period p) {
    return period_nominal_end_ms(format, p) +
           static_cast<std::uint32_t>(std::llround(expected_stoppage(params, p) * 60'000.0));
}

}  // namespace

std::vector<InboundMessage> position_messages(std::uint64_t match_id, const MatchPosition& position,
                                              const ModelParams& params) {
    const CompetitionFormat& format = position.format;
    const Period now = position.clock.period;
    if (!is_playing_period(now) || (is_extra_time(now) && !format.extra_time)) {
        throw std::invalid_argument("the clock is in no period of play of this format");
    }
    if (position.clock.clock_ms < period_start_ms(format, now) ||
        position.clock.clock_ms > period_latest_ms(format, now)) {
        throw std::invalid_argument("the clock lies outside its period");
    }
    for (int goals : position.score) {
        if (goals < 0 || goals > 99) throw std::invalid_argument("goals must be 0..99 per side");
    }
    for (int reds : position.reds) {
        if (reds < 0 || reds > 5) throw std::invalid_argument("red cards must be 0..5 per side");
    }
    if (is_extra_time(now) &&
        position.score[0] + (format.first_leg ? format.first_leg->home_goals : 0) !=
            position.score[1] + (format.first_leg ? format.first_leg->away_goals : 0)) {
        throw std::invalid_argument(
            "extra time is played only when the tie is level after regulation");
    }
    if (position.stoppage_minutes &&
        (*position.stoppage_minutes < 0 || *position.stoppage_minutes > 30)) {
        throw std::invalid_argument("stoppage must be 0..30 minutes");
    }

    Builder b{match_id, {}};
    // Goals and cards come at the position's clock, or at the end of regulation when the
    // position is in extra time.
    const Period events_period = is_extra_time(now) ? Period::second_half : now;
    auto add_events = [&](MatchClock at) {
        for (Side s : {Side::home, Side::away}) {
            for (int i = 0; i < position.score[static_cast<std::size_t>(index(s))]; ++i)
                b.add(Goal{s, false, false}, at);
        }
        for (Side s : {Side::home, Side::away}) {
            for (int i = 0; i < position.reds[static_cast<std::size_t>(index(s))]; ++i)
                b.add(RedCard{s, false}, at);
        }
    };
    for (Period p = Period::first_half; p <= now;
         p = static_cast<Period>(static_cast<int>(p) + 1)) {
        b.add(PeriodStart{p}, MatchClock{p, period_start_ms(format, p)});
        if (p == now) break;
        const MatchClock end{p, played_end_ms(format, params, p)};
        if (p == events_period) add_events(end);
        b.add(PeriodEnd{p}, end);
    }
    if (events_period == now) add_events(position.clock);
    if (position.stoppage_minutes) {
        b.add(StoppageAnnounced{now, static_cast<std::uint16_t>(*position.stoppage_minutes)},
              position.clock);
    }
    b.add(ClockSync{true}, position.clock);  // anchors the clock at the position's reading
    return std::move(b.messages);
}

Match match_at(const MatchPosition& position, const ModelParams& params) {
    MatchSetup setup;
    setup.prior = position.prior;
    setup.format = position.format;
    Match match(kPositionMatchId, setup, params);
    for (const auto& m : position_messages(kPositionMatchId, position, params)) {
        const ApplyResult r = match.apply(m);
        if (r.verdict != Verdict::accepted) {
            throw std::invalid_argument(std::string("position cannot be reached: ") +
                                        kind_name(m.body) + " " + reject_reason_name(r.reason));
        }
    }
    return match;
}

}  // namespace liveprob::core
