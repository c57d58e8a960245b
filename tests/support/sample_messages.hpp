// Invented sample messages, one or more of every inbound kind, for codec tests.
#pragma once

#include <cmath>
#include <vector>

#include "liveprob/core/messages.hpp"
#include "liveprob/core/outputs.hpp"

namespace liveprob::test {

inline core::InboundMessage sample_message(std::uint64_t seq, core::Period period,
                                           std::uint32_t clock_ms, core::MessageBody body) {
    core::InboundMessage m;
    m.header.match_id = 4242;
    m.header.source_seq = seq;
    m.header.source_time_us = 1'790'000'000'000'000 + static_cast<std::int64_t>(seq) * 1'000'000;
    m.header.clock = {period, clock_ms};
    m.body = std::move(body);
    return m;
}

// Every kind at least once; setups with a prior, with rating references and a first leg.
inline std::vector<core::InboundMessage> sample_messages() {
    core::MatchSetup with_prior;
    with_prior.home_name = "Kestrel Vale";
    with_prior.away_name = "Orrin Bay";
    with_prior.prior = core::PriorMeans{1.45, 1.05};
    with_prior.scheduled_kickoff_us = 1'790'000'000'000'000;

    core::MatchSetup knockout;
    knockout.home_name = "Quillmoor";
    knockout.away_name = "Tarnhollow";
    knockout.neutral_venue = true;
    knockout.ratings = core::RatingReference{"Quillmoor", "Tarnhollow"};
    knockout.format.extra_time = true;
    knockout.format.extra_half_minutes = 15;
    knockout.format.shootout = true;
    knockout.format.first_leg = core::FirstLegResult{2, 1};

    return {
        sample_message(1, core::Period::pre_match, 0, with_prior),
        sample_message(2, core::Period::pre_match, 0, knockout),
        sample_message(3, core::Period::first_half, 0, core::PeriodStart{core::Period::first_half}),
        sample_message(4, core::Period::first_half, 754'000,
                       core::Goal{core::Side::home, true, false}),
        sample_message(5, core::Period::first_half, 1'200'500,
                       core::Goal{core::Side::away, false, true}),
        sample_message(6, core::Period::first_half, 1'300'000, core::GoalCancelled{5}),
        sample_message(7, core::Period::first_half, 1'900'000,
                       core::RedCard{core::Side::away, true}),
        sample_message(8, core::Period::first_half, 1'950'000, core::CardRescinded{7}),
        sample_message(9, core::Period::first_half, 2'700'000,
                       core::StoppageAnnounced{core::Period::first_half, 3}),
        sample_message(10, core::Period::first_half, 2'890'000,
                       core::PeriodEnd{core::Period::first_half}),
        sample_message(11, core::Period::second_half, 4'100'000, core::ScoreCorrection{2, 1}),
        sample_message(12, core::Period::second_half, 4'200'000,
                       core::ShotXg{core::Side::home, 0.37}),
        sample_message(13, core::Period::second_half, 4'300'000, core::ClockSync{false}),
        sample_message(14, core::Period::second_half, 4'310'000, core::ClockSync{true}),
        sample_message(15, core::Period::shootout, 7'200'000,
                       core::ShootoutKick{core::Side::home, true}),
        sample_message(16, core::Period::shootout, 7'200'000,
                       core::ShootoutKick{core::Side::away, false}),
        sample_message(17, core::Period::second_half, 5'000'000,
                       core::MatchAbandoned{"floodlight failure"}),
        sample_message(18, core::Period::finished, 5'700'000, core::FinalWhistle{}),
    };
}

// A plausible full set of outputs (not from the model: only the codec is under test).
inline core::Outputs sample_outputs() {
    core::Outputs o;
    o.status = core::MatchStatus::in_play;
    o.clock = {core::Period::second_half, 4'000'000};
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
    for (int i = 0; i < core::kTotalsLines; ++i)
        o.p_over[static_cast<std::size_t>(i)] = 1.0 / (2.0 + i);
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
