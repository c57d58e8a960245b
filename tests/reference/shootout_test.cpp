// The exact shoot-out solution against brute-force enumeration of every kick sequence: each
// sequence's probability is the product of its kicks' outcomes, its winner found by replaying
// the rules kick by kick (best of five in ABAB order, stopping once a side cannot catch up,
// then sudden-death rounds). Sudden death is enumerated up to a depth whose leftover mass is
// bounded and used as the tolerance.
// test-build: optimised (the enumeration of 4M kick sequences per case)
#include <catch2/catch.hpp>

#include <cmath>
#include <vector>

#include "liveprob/core/shootout.hpp"

using namespace liveprob;

using namespace liveprob::core;

namespace {

struct Tally {
    double first = 0.0, second = 0.0, unresolved = 0.0;
};

// Replays one complete outcome list (true = scored) from a start state and reports who won,
// or nobody if the list runs out. Written from the rules, independently of the solver.
int winner(std::vector<bool> const& kicks, int ft, int fs, int st, int ss) {
    std::size_t next = 0;
    while (true) {
        // Decided in the best of five?
        if (ft <= 5 && st <= 5) {
            if (fs + (5 - ft) < ss) return 2;
            if (ss + (5 - st) < fs) return 1;
            if (ft == 5 && st == 5 && fs != ss) return fs > ss ? 1 : 2;
        } else if (ft == st && fs != ss) {
            return fs > ss ? 1 : 2;  // a sudden-death round ended unequal
        }
        if (next == kicks.size()) return 0;
        if (ft == st) {
            ++ft;
            fs += kicks[next++] ? 1 : 0;
        } else {
            ++st;
            ss += kicks[next++] ? 1 : 0;
        }
    }
}

// Enumerates every outcome list of `length` kicks.
Tally enumerate(double pf, double ps, int ft, int fs, int st, int ss, int length) {
    Tally t;
    const unsigned long total = 1ul << length;
    for (unsigned long bits = 0; bits < total; ++bits) {
        std::vector<bool> kicks(static_cast<std::size_t>(length));
        double prob = 1.0;
        int f = ft, s = st;
        for (int k = 0; k < length; ++k) {
            const bool scored = (bits >> k) & 1ul;
            kicks[static_cast<std::size_t>(k)] = scored;
            const bool first_kicks = f == s;
            const double p = first_kicks ? pf : ps;
            prob *= scored ? p : 1.0 - p;
            (first_kicks ? f : s)++;
        }
        // Sequences that decide early are counted once per continuation; the products of
        // the unused kicks' outcomes sum to one, so the totals stay exact.
        switch (winner(kicks, ft, fs, st, ss)) {
            case 1: t.first += prob; break;
            case 2: t.second += prob; break;
            default: t.unresolved += prob; break;
        }
    }
    return t;
}

}  // namespace

TEST_CASE("shoot-out from the start equals brute-force enumeration of all kick sequences") {
    const double cases[][2] = {{0.75, 0.0}, {0.70, 0.05}, {0.82, -0.04}, {0.5, 0.1}};
    for (const auto& c : cases) {
        ShootoutParams params{c[0], c[1]};
        const double pf = c[0] + c[1], ps = c[0];
        // 10 kicks of the best of five plus 6 sudden-death rounds: 22 kicks, 4M sequences.
        const Tally t = enumerate(pf, ps, 0, 0, 0, 0, 22);
        ShootoutState state;
        state.first = Side::home;
        const double exact = shootout_home_win(params, state);
        INFO("conversion " << c[0] << " edge " << c[1] << " unresolved " << t.unresolved);
        CHECK(t.first + t.second + t.unresolved == Approx(1.0).margin(1e-12));
        // The exact value lies between the resolved mass and the resolved plus unresolved.
        CHECK(exact >= t.first - 1e-12);
        CHECK(exact <= t.first + t.unresolved + 1e-12);
        // Unresolved states are level after full rounds: split them with the sudden-death
        // ratio of one round (rounds are independent and identical).
        const double round_first = pf * (1 - ps), round_second = (1 - pf) * ps;
        const double split = t.first + t.unresolved * round_first / (round_first + round_second);
        CHECK(exact == Approx(split).margin(1e-12));
    }
}

TEST_CASE("shoot-out from every partial state of the best of five equals enumeration") {
    const ShootoutParams params{0.76, 0.02};
    const double pf = 0.78, ps = 0.76;
    int states = 0;
    for (int ft = 0; ft <= 5; ++ft) {
        for (int st = ft - 1; st <= ft; ++st) {
            if (st < 0) continue;
            for (int fs = 0; fs <= ft; ++fs) {
                for (int ss = 0; ss <= st; ++ss) {
                    if (shootout_outcome(ft, fs, st, ss) != ShootoutOutcome::undecided) continue;
                    const int left =
                        (5 - ft) + (5 - st) + 8;  // the rest plus 4 sudden-death rounds
                    const Tally t = enumerate(pf, ps, ft, fs, st, ss, left);
                    const double round_first = pf * (1 - ps), round_second = (1 - pf) * ps;
                    const double split =
                        t.first + t.unresolved * round_first / (round_first + round_second);
                    ShootoutState state;
                    state.first = Side::away;  // the away side kicks first here
                    state.taken = {st, ft};
                    state.scored = {ss, fs};
                    const double away_wins = 1.0 - shootout_home_win(params, state);
                    CHECK(away_wins == Approx(split).margin(1e-12));
                    ++states;
                }
            }
        }
    }
    CHECK(states > 40);
}

TEST_CASE("shoot-out in sudden death, kick by kick") {
    const ShootoutParams params{0.75, 0.0};
    ShootoutState s;
    s.first = Side::home;
    s.taken = {6, 5};
    s.scored = {5, 4};  // home scored its sixth; away must score to go on
    // Away scores with 0.75, then a fresh level round: home wins it with 1/2 by symmetry.
    CHECK(shootout_home_win(params, s) == Approx(0.25 + 0.75 * 0.5).margin(1e-15));
    s.scored = {4, 4};  // home missed its sixth: away wins by scoring
    CHECK(shootout_home_win(params, s) == Approx(0.25 * 0.5).margin(1e-15));
    s.taken = {7, 5};  // not reachable in ABAB order
    CHECK_THROWS_AS(shootout_home_win(params, s), std::invalid_argument);
}
