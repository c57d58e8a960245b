// The shoot-out's per-kick conversion p and first-kicker edge e (ShootoutParams: the side
// kicking first converts p + e, the other p), fitted by maximum likelihood under the engine's
// exact shoot-out model (shootout.hpp: best of five in ABAB order, ending once a side cannot
// catch up, then sudden-death rounds).
//
// What the records can identify:
//  - winner and first kicker only: P(first kicker wins) = q(p, e). With e = 0, q = 1/2 for
//    every p (the two sides' kicks are exchangeable), so these records say nothing about p;
//    given p they identify e through the one number q, and q̂ = wins / records in closed form.
//  - winner only: P = 1/2 whatever p and e (the first kicker is a coin toss): no information.
//  - kicks scored per side (a tally): the tally's probability under both kicking orders (1/2
//    each when the first kicker is unknown) identifies p; the kicks taken follow from the tally
//    and the order, so with a known order and e = 0 the fit is the binomial scored / taken.
// The conversion is fitted only when some record carries a tally and the edge only when some
// record names the first kicker; otherwise each is held at its starting value.
#pragma once

#include <array>
#include <optional>
#include <span>

#include "liveprob/core/messages.hpp"
#include "liveprob/core/params.hpp"

namespace liveprob::fit {

struct ShootoutRecord {
    core::Side winner = core::Side::home;
    std::optional<core::Side> first_kicker;
    std::optional<std::array<int, 2>> scored;  // kicks scored, home and away
};

struct ShootoutFit {
    core::ShootoutParams params;
    double conversion_se = 0.0, edge_se = 0.0;
    bool conversion_fitted = false, edge_fitted = false;
    int records = 0;
    int with_first_kicker = 0, first_kicker_wins = 0;  // records naming the first kicker
    int with_tally = 0, tally_kicks_scored = 0;
    int uninformative = 0;                      // winner only
    double first_kicker_win_probability = 0.0;  // q at the fit
    double first_kicker_win_probability_se = 0.0;
    double log_likelihood = 0.0;
    int iterations = 0;
    bool converged = false;
};

// Throws std::invalid_argument when a tally is impossible under the rules (a level tally, or
// one no kick sequence ends on) or the starting values lie outside (0, 1).
[[nodiscard]] ShootoutFit fit_shootout(std::span<const ShootoutRecord> records,
                                       const core::ShootoutParams& start);

// P(a shoot-out ends with the first-kicking side on `first_scored` and the other on
// `second_scored`), the kicks converting with the given probabilities, by the engine's rules.
[[nodiscard]] double shootout_tally_probability(double first_conversion, double second_conversion,
                                                int first_scored, int second_scored);

}  // namespace liveprob::fit
