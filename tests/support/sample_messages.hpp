// Invented sample messages, one or more of every inbound kind, for codec tests.
#pragma once

#include <cmath>
#include <vector>

#include "liveprob/engine/messages.hpp"
#include "liveprob/engine/outputs.hpp"

namespace liveprob::test {

inline InboundMessage sample_message(std::uint64_t seq, Period period, std::uint32_t clock_ms,
                                     MessageBody body) {
    InboundMessage m;
    m.header.match_id = 4242;
    m.header.source_seq = seq;
    m.header.source_time_us = 1'790'000'000'000'000 + static_cast<std::int64_t>(seq) * 1'000'000;
    m.header.clock = {period, clock_ms};
    m.body = std::move(body);
    return m;
}

// Every kind at least once; setups with a prior, with rating references and a first leg.
inline std::vector<InboundMessage> sample_messages() {
    MatchSetup with_prior;
    with_prior.home_name = "Kestrel Vale";
    with_prior.away_name = "Orrin Bay";
    with_prior.prior = PriorMeans{1.45, 1.05};
    with_prior.scheduled_kickoff_us = 1'790'000'000'000'000;

    MatchSetup knockout;
    knockout.home_name = "Quillmoor";
    knockout.away_name = "Tarnhollow";
    knockout.neutral_venue = true;
    knockout.ratings = RatingReference{"Quillmoor", "Tarnhollow"};
    knockout.format.extra_time = true;
    knockout.format.extra_half_minutes = 15;
    knockout.format.shootout = true;
    knockout.format.first_leg = FirstLegResult{2, 1};

    return {
        sample_message(1, Period::pre_match, 0, with_prior),
        sample_message(2, Period::pre_match, 0, knockout),
        sample_message(3, Period::first_half, 0, PeriodStart{Period::first_half}),
        sample_message(4, Period::first_half, 754'000, Goal{Side::home, true, false}),
        sample_message(5, Period::first_half, 1'200'500, Goal{Side::away, false, true}),
        sample_message(6, Period::first_half, 1'300'000, GoalCancelled{5}),
        sample_message(7, Period::first_half, 1'900'000, RedCard{Side::away, true}),
        sample_message(8, Period::first_half, 1'950'000, CardRescinded{7}),
        sample_message(9, Period::first_half, 2'700'000, StoppageAnnounced{Period::first_half, 3}),
        sample_message(10, Period::first_half, 2'890'000, PeriodEnd{Period::first_half}),
        sample_message(11, Period::second_half, 4'100'000, ScoreCorrection{2, 1}),
        sample_message(12, Period::second_half, 4'200'000, ShotXg{Side::home, 0.37}),
        sample_message(13, Period::second_half, 4'300'000, ClockSync{false}),
        sample_message(14, Period::second_half, 4'310'000, ClockSync{true}),
        sample_message(15, Period::shootout, 7'200'000, ShootoutKick{Side::home, true}),
        sample_message(16, Period::shootout, 7'200'000, ShootoutKick{Side::away, false}),
        sample_message(17, Period::second_half, 5'000'000, MatchAbandoned{"floodlight failure"}),
        sample_message(18, Period::finished, 5'700'000, FinalWhistle{}),
    };
}

// A plausible full set of outputs (not from the model: only the codec is under test).
inline Outputs sample_outputs() {
    Outputs o;
    o.status = MatchStatus::in_play;
    o.clock = {Period::second_half, 4'000'000};
    o.home_goals = 1;
    o.away_goals = 2;
    o.home_reds = 1;
    o.p_home = 0.21;
    o.p_draw = 0.29;
    o.p_away = 0.5;
    o.has_advance = true;
    o.p_advance_home = 0.35;
    o.p_advance_away = 0.65;
    o.expected_home_goals = 1.6;
    o.expected_away_goals = 2.4;
    o.next_goal_home = 0.4;
    o.next_goal_away = 0.45;
    o.next_goal_none = 0.15;
    for (int i = 0; i < kTotalsLines; ++i) o.p_over[static_cast<std::size_t>(i)] = 1.0 / (2.0 + i);
    o.p_both_score = 0.99;
    for (int i = 0; i < 5; ++i) {
        for (int j = 0; j < 4; ++j) {
            const double cell = std::exp(-0.5 * (i + j)) / 10.0;
            o.goals_added[static_cast<std::size_t>(i)][static_cast<std::size_t>(j)] = cell;
        }
    }
    o.tail_mass = 1e-9;
    o.events_applied = 31;
    return o;
}

}  // namespace liveprob::test
