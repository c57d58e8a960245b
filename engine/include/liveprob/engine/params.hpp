// Model parameters that do not change within a match. Every default names where it comes from;
// `liveprob fit-inplay` replaces them with fitted values (written to a parameter file).
#pragma once

#include <limits>

namespace liveprob {

// Relative goal-scoring rate through a match, r(t). Linear within each half between the rates
// at its start and its nominal end; stoppage time runs at `stoppage_factor` times the rate at
// the half's end. The engine rescales r so that the expected exposure of a whole regulation
// match, with the expected stoppage below, is exactly 1: the prior means are then expected
// regulation goals.
struct TimingProfile {
    // Shape: a rate that rises through the match; 45% of regulation goals before half-time
    // (the data measured 55% after half-time, see DESIGN.md). Starting values, from memory,
    // until fitted.
    double first_half_start = 0.85;
    double first_half_end = 1.00;
    double second_half_start = 1.00;
    double second_half_end = 1.25;
    double stoppage_factor = 1.0;
    // Expected stoppage when none is announced yet, minutes (from memory).
    double expected_stoppage_first = 2.5;
    double expected_stoppage_second = 5.0;
    // Extra time: rate per minute relative to the end of the second half (from memory).
    double extra_time_factor = 0.85;
    double expected_stoppage_extra = 1.0;  // per extra-time half (from memory)
    // Once the clock has passed the announced (or expected) stoppage, the rest of the period
    // still counts this many minutes at the stoppage rate: play runs on to finish a move
    // (the project's choice, common practice that the whistle comes within about a minute).
    double overrun_minutes = 0.5;
};

// Score-state multipliers on a side's rate, by that side's own situation (from memory:
// Dixon & Robinson 1998 report score dependence; values common in later studies).
struct ScoreStateEffects {
    double leading = 0.92;
    double level = 1.00;
    double trailing = 1.15;
};

// Red cards: per card shown to a side, its rate is multiplied by `own_per_card` and its
// opponent's by `opponent_per_card`; at most `max_cards` per side count (from memory:
// published red-card studies, see DESIGN.md; the open data carries no cards).
struct RedCardEffects {
    double own_per_card = 0.70;
    double opponent_per_card = 1.30;
    int max_cards = 2;
};

struct ShootoutParams {
    double conversion = 0.75;         // per kick (from memory)
    double first_kicker_edge = 0.0;   // added to the first-kicking side's conversion
};

struct ModelParams {
    TimingProfile timing;
    ScoreStateEffects score_state;
    RedCardEffects red_cards;
    ShootoutParams shootout;
    // Strength dispersion: theta ~ Gamma(kappa, kappa) before kick-off; infinity = plain Poisson.
    double kappa = 25.0;  // from memory, until fitted
    // Weight of one unit of xG evidence relative to one goal in the strength update.
    double xg_weight = 0.5;  // the project's starting choice (no data here carries xG)
    // Gauss quadrature nodes for the strength mixture: nodes of the strength ratio when both
    // strengths are Gamma-distributed, per side when one is known (documented accuracy in
    // engine/README.md: 5 nodes agree with a converged mixture to about 2e-9 at κ = 25).
    int quadrature_nodes = 5;

    static ModelParams plain_poisson() {
        ModelParams p;
        p.score_state = {1.0, 1.0, 1.0};
        p.red_cards = {1.0, 1.0, 0};
        p.kappa = std::numeric_limits<double>::infinity();
        return p;
    }
};

}  // namespace liveprob
