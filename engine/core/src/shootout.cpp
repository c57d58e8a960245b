#include "liveprob/core/shootout.hpp"

#include <algorithm>
#include <array>
#include <cstddef>
#include <stdexcept>

namespace liveprob::core {
namespace {

struct Kickers {
    double first = 0.0;  // conversion of the side kicking first
    double second = 0.0;
};

Kickers conversions(const ShootoutParams& p) {
    const Kickers k{p.conversion + p.first_kicker_edge, p.conversion};
    if (!(k.first > 0.0 && k.first < 1.0 && k.second > 0.0 && k.second < 1.0)) {
        throw std::invalid_argument(
            "shoot-out conversion (with the first-kicker edge) must lie in (0, 1)");
    }
    return k;
}

// P(first kicker wins) from a state, by recursion over the next kick; a level state after a
// complete sudden-death round closes in form. Within the best of five the same states are
// reached along many kick orders, so they are remembered (at most 6^4 of them): without that
// the recursion from the first kick visits thousands of paths.
class FirstWins {
public:
    explicit FirstWins(const Kickers& k) : k_(k) { memo_.fill(-1.0); }

    double operator()(int ft, int fs, int st, int ss) {
        switch (shootout_outcome(ft, fs, st, ss)) {
            case ShootoutOutcome::first_wins: return 1.0;
            case ShootoutOutcome::second_wins: return 0.0;
            case ShootoutOutcome::undecided: break;
        }
        if (ft == st && ft >= kShootoutRegularKicks) {
            // Level after a complete round of sudden death: rounds repeat until one differs.
            const double first_round = k_.first * (1.0 - k_.second);
            const double second_round = (1.0 - k_.first) * k_.second;
            return first_round / (first_round + second_round);
        }
        const bool remembered = ft <= kShootoutRegularKicks && st <= kShootoutRegularKicks;
        double* slot = remembered ? &memo_[slot_of(ft, fs, st, ss)] : nullptr;
        if (slot && *slot >= 0.0) return *slot;
        const double p = ft == st  // the first side is due to kick
                             ? k_.first * (*this)(ft + 1, fs + 1, st, ss) +
                                   (1.0 - k_.first) * (*this)(ft + 1, fs, st, ss)
                             : k_.second * (*this)(ft, fs, st + 1, ss + 1) +
                                   (1.0 - k_.second) * (*this)(ft, fs, st + 1, ss);
        if (slot) *slot = p;
        return p;
    }

private:
    static constexpr std::size_t kSide = kShootoutRegularKicks + 1;  // 0 .. 5 kicks taken or scored
    static std::size_t slot_of(int ft, int fs, int st, int ss) {
        return ((static_cast<std::size_t>(ft) * kSide + static_cast<std::size_t>(fs)) * kSide +
                static_cast<std::size_t>(st)) *
                   kSide +
               static_cast<std::size_t>(ss);
    }
    Kickers k_;
    std::array<double, kSide * kSide * kSide * kSide> memo_{};
};

}  // namespace

ShootoutOutcome shootout_outcome(int first_taken, int first_scored, int second_taken,
                                 int second_scored) {
    // Kicks each side is still due in the current stage: the best of five, or the current
    // sudden-death round once past it.
    const int round = std::max({kShootoutRegularKicks, first_taken, second_taken});
    const int first_left = round - first_taken;
    const int second_left = round - second_taken;
    if (first_scored + first_left < second_scored) return ShootoutOutcome::second_wins;
    if (second_scored + second_left < first_scored) return ShootoutOutcome::first_wins;
    return ShootoutOutcome::undecided;
}

double shootout_home_win(const ShootoutParams& params, const ShootoutState& state) {
    const Kickers k = conversions(params);
    const int f = index(state.first);
    const int s = index(other(state.first));
    const int ft = state.taken[static_cast<std::size_t>(f)];
    const int st = state.taken[static_cast<std::size_t>(s)];
    const int fs = state.scored[static_cast<std::size_t>(f)];
    const int ss = state.scored[static_cast<std::size_t>(s)];
    if (ft < 0 || st < 0 || fs < 0 || ss < 0 || fs > ft || ss > st || !(ft == st || ft == st + 1)) {
        throw std::invalid_argument("shoot-out state not reachable in ABAB order");
    }
    const double p_first = FirstWins(k)(ft, fs, st, ss);
    return state.first == Side::home ? p_first : 1.0 - p_first;
}

double shootout_home_win_before_toss(const ShootoutParams& params) {
    ShootoutState home_first;
    home_first.first = Side::home;
    ShootoutState away_first;
    away_first.first = Side::away;
    return 0.5 * (shootout_home_win(params, home_first) + shootout_home_win(params, away_first));
}

}  // namespace liveprob::core
