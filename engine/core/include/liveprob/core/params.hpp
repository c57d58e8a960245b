// Model parameters that do not change within a match. Every default names where it comes from:
// "fitted" ones are `liveprob fit-inplay` on the open data; the rest are marked "from memory" or
// the project's choice. A parameter file (fit-inplay writes one) replaces them.
#pragma once

#include <limits>

namespace liveprob::core {

// Relative goal-scoring rate through a match, r(t). Linear within each half between the rates
// at its start and its nominal end; stoppage time runs at `stoppage_factor` times the rate at
// the half's end. The engine rescales r so that the expected exposure of a whole regulation
// match, with the expected stoppage below, is exactly 1: the prior means are then expected
// regulation goals.
//
// Defaults marked "fitted" are `liveprob fit-inplay` on the open international goal minutes,
// shoot-outs and the two championship files (values rounded within their standard errors;
// command, figures and standard errors in engine/README.md, "Parameters").
struct TimingProfile {
    // Shape: fitted (rates relative to the end of the first half, which is fixed at 1). It
    // reproduces the data's 55.2% of regulation goals after half-time.
    double first_half_start = 0.725;
    double first_half_end = 1.00;
    double second_half_start = 0.919;
    double second_half_end = 1.169;
    // Fitted on the championship files, which tell stoppage-time goals apart, with the expected
    // stoppage below held (only their product is identified). (The international goal minutes
    // fold stoppage into minutes 45 and 90 and reach back a century of shorter stoppage: they
    // give 0.30, not used here.)
    double stoppage_factor = 1.21;
    // Expected stoppage when none is announced yet, minutes (from memory).
    double expected_stoppage_first = 2.5;
    double expected_stoppage_second = 5.0;
    // Extra time: rate per minute relative to the end of the second half (fitted: time to the
    // first extra-time goal).
    double extra_time_factor = 0.83;
    double expected_stoppage_extra = 1.0;  // per extra-time half (from memory)
    // Once the clock has passed the announced (or expected) stoppage, the rest of the period
    // still counts this many minutes at the stoppage rate: play runs on to finish a move
    // (the project's choice, common practice that the whistle comes within about a minute).
    double overrun_minutes = 0.5;
};

// Score-state multipliers on a side's rate, by that side's own situation (fitted jointly with
// κ; Dixon & Robinson 1998 report the score dependence).
struct ScoreStateEffects {
    double leading = 0.948;
    double level = 0.997;
    double trailing = 1.078;
};

// Red cards: per card shown to a side, its rate is multiplied by `own_per_card` and its
// opponent's by `opponent_per_card`; at most `max_cards` per side count (from memory:
// published red-card studies, see DESIGN.md; the open data carry no cards).
struct RedCardEffects {
    double own_per_card = 0.70;
    double opponent_per_card = 1.30;
    int max_cards = 2;
};

struct ShootoutParams {
    double conversion = 0.674;         // per kick (fitted on the championship files' tallies)
    double first_kicker_edge = 0.028;  // added to the first-kicking side's conversion (fitted on
                                       // who won the shoot-outs naming the first kicker)
};

struct ModelParams {
    TimingProfile timing;
    ScoreStateEffects score_state;
    RedCardEffects red_cards;
    ShootoutParams shootout;
    // Strength dispersion: theta ~ Gamma(kappa, kappa) before kick-off; infinity = plain Poisson.
    double kappa = 11.25;  // fitted jointly with the score-state effects
    // Weight of one unit of xG evidence relative to one goal in the strength update.
    double xg_weight = 0.5;  // the project's starting choice (no data here carries xG)
    // Gauss quadrature nodes for the strength mixture: nodes of the strength ratio when both
    // strengths are Gamma-distributed, per side when one is known (documented accuracy in
    // engine/README.md: 5 nodes agree with a converged mixture to 5e-8 at the fitted κ, 2e-9
    // at κ = 25; raise it for a smaller κ).
    int quadrature_nodes = 5;

    [[nodiscard]] static ModelParams plain_poisson() {
        ModelParams p;
        p.score_state = {1.0, 1.0, 1.0};
        p.red_cards = {1.0, 1.0, 0};
        p.kappa = std::numeric_limits<double>::infinity();
        return p;
    }
};

}  // namespace liveprob::core
