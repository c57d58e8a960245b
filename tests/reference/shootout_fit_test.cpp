// The shoot-out fit against references written here from the published rules (IFAB Laws of the
// Game, Law 10: kicks alternate; the shoot-out ends once one team has scored more than the other
// could with all its remaining kicks of the five; after five each, at the end of the first round
// in which the goals differ):
//  - tally probabilities against a brute-force walk over every kick sequence of the first five
//    rounds with sudden death summed as a negative-binomial series;
//  - winner-and-first-kicker records: the binomial closed form, P(first kicker wins) = wins / n
//    with standard error sqrt(q (1 − q) / n);
//  - the conversion from the championship files' tallies against the maximum of the
//    brute-force likelihood, found by golden-section search.
// test-build: optimised (brute-force walks over every kick sequence inside likelihood searches)
#include <catch2/catch.hpp>

#include <cmath>
#include <functional>
#include <map>

#include "liveprob/core/shootout.hpp"
#include "liveprob/datasets/inplay_records.hpp"
#include "liveprob/fit/shootout_fit.hpp"
#include "test_env.hpp"

namespace fit = liveprob::fit;
using liveprob::core::Side;

namespace {

using Tallies = std::map<std::pair<int, int>, double>;  // (first scored, second scored) -> P

// Every kick sequence of the first five rounds, by Law 10; a tie after them goes to sudden
// death, summed in closed form: from level at k each, the first kicker wins at k + j + 1 to
// k + j after j rounds both score and any number both miss, with probability
// (p₁p₂)^j p₁(1 − p₂) / (1 − (1 − p₁)(1 − p₂))^{j+1} (a negative-binomial series); likewise the
// second kicker.
void walk(int fk, int fs, int sk, int ss, double prob, double p_first, double p_second,
          Tallies& out) {
    constexpr int kFive = 5;
    if (fs > ss + (kFive - sk) || ss > fs + (kFive - fk)) {
        out[{fs, ss}] += prob;
        return;
    }
    if (fk == kFive && sk == kFive) {  // level after five rounds: sudden death
        const double both_score = p_first * p_second, both_miss = (1 - p_first) * (1 - p_second);
        for (int j = 0; j < 200; ++j) {
            const double reach = prob * std::pow(both_score, j) / std::pow(1.0 - both_miss, j + 1);
            out[{fs + j + 1, ss + j}] += reach * p_first * (1 - p_second);
            out[{fs + j, ss + j + 1}] += reach * (1 - p_first) * p_second;
        }
        return;
    }
    if (fk == sk) {
        walk(fk + 1, fs + 1, sk, ss, prob * p_first, p_first, p_second, out);
        walk(fk + 1, fs, sk, ss, prob * (1.0 - p_first), p_first, p_second, out);
    } else {
        walk(fk, fs, sk + 1, ss + 1, prob * p_second, p_first, p_second, out);
        walk(fk, fs, sk + 1, ss, prob * (1.0 - p_second), p_first, p_second, out);
    }
}

Tallies brute_force(double p_first, double p_second) {
    Tallies t;
    walk(0, 0, 0, 0, 1.0, p_first, p_second, t);
    return t;
}

double golden_section_max(const std::function<double(double)>& f, double lo, double hi) {
    const double g = (std::sqrt(5.0) - 1.0) / 2.0;
    double a = lo, b = hi, c = b - g * (b - a), d = a + g * (b - a);
    while (b - a > 1e-12) {
        if (f(c) > f(d)) b = d;
        else a = c;
        c = b - g * (b - a);
        d = a + g * (b - a);
    }
    return 0.5 * (a + b);
}

}  // namespace

TEST_CASE("tally probabilities equal a brute-force walk over every kick sequence") {
    const double p_first = 0.81, p_second = 0.74;
    const Tallies reference = brute_force(p_first, p_second);
    double total = 0.0, first_wins = 0.0;
    for (int a = 0; a <= 60; ++a)
        for (int b = 0; b <= 60; ++b) {
            const double p = fit::shootout_tally_probability(p_first, p_second, a, b);
            const auto it = reference.find({a, b});
            INFO("tally " << a << "-" << b << ": " << p << " vs "
                          << (it == reference.end() ? 0.0 : it->second));
            CHECK(p == Approx(it == reference.end() ? 0.0 : it->second).margin(1e-13));
            total += p;
            if (a > b) first_wins += p;
        }
    CHECK(total == Approx(1.0).margin(1e-12));
    // The engine's shoot-out model gives the same chance to the first kicker.
    liveprob::core::ShootoutState start;
    start.first = Side::home;
    CHECK(first_wins ==
          Approx(liveprob::core::shootout_home_win({p_second, p_first - p_second}, start))
              .margin(1e-12));
}

TEST_CASE("winner and first kicker only: the binomial closed form, and the conversion is held") {
    std::vector<fit::ShootoutRecord> records;
    for (int i = 0; i < 130; ++i)
        records.push_back({i < 70 ? Side::home : Side::away, Side::home, std::nullopt});
    for (int i = 0; i < 40; ++i)
        records.push_back({Side::away, std::nullopt, std::nullopt});  // winner only
    const liveprob::core::ShootoutParams start{0.75, 0.0};
    const auto f = fit::fit_shootout(records, start);
    REQUIRE(f.converged);
    CHECK_FALSE(f.conversion_fitted);
    CHECK(f.edge_fitted);
    CHECK(f.params.conversion == 0.75);
    CHECK(f.uninformative == 40);
    const double q = 70.0 / 130.0;
    CHECK(f.first_kicker_win_probability == Approx(q).margin(1e-9));
    CHECK(f.first_kicker_win_probability_se ==
          Approx(std::sqrt(q * (1 - q) / 130.0)).epsilon(1e-4));
    CHECK(f.params.first_kicker_edge > 0.0);
    // With no edge the first kicker wins half the time whatever the conversion.
    liveprob::core::ShootoutState state;
    state.first = Side::home;
    for (double p : {0.6, 0.75, 0.9})
        CHECK(liveprob::core::shootout_home_win({p, 0.0}, state) == Approx(0.5).margin(1e-14));
}

TEST_CASE(
    "the conversion from the championship files' tallies is the brute-force likelihood's maximum") {
    const auto dir = liveprob::test::open_data_dir() / "euro";
    std::vector<fit::ShootoutRecord> records;
    for (const char* year : {"2020", "2024"}) {
        const auto read =
            liveprob::datasets::read_championship_timelines((dir / year / "euro.json").string());
        const auto more = liveprob::datasets::shootout_records(read.matches);
        records.insert(records.end(), more.records.begin(), more.records.end());
    }
    REQUIRE(records.size() == 7);  // four in 2020 (played 2021), three in 2024
    const auto f = fit::fit_shootout(records, {0.75, 0.0});
    REQUIRE(f.converged);
    CHECK(f.conversion_fitted);
    CHECK_FALSE(f.edge_fitted);  // no record names its first kicker: the edge is held at 0

    // The reference: each tally under either kicking order (1/2 each), by brute force.
    auto log_likelihood = [&](double p) {
        const Tallies t = brute_force(p, p);
        double ll = 0.0;
        for (const auto& r : records) {
            const auto& s = *r.scored;
            auto at = [&](int a, int b) {
                const auto it = t.find({a, b});
                return it == t.end() ? 0.0 : it->second;
            };
            ll += std::log(0.5 * at(s[0], s[1]) + 0.5 * at(s[1], s[0]));
        }
        return ll;
    };
    const double p = golden_section_max(log_likelihood, 0.3, 0.99);
    CHECK(f.params.conversion == Approx(p).margin(1e-6));
    const double h = 1e-4;
    const double curvature =
        (log_likelihood(p + h) - 2 * log_likelihood(p) + log_likelihood(p - h)) / (h * h);
    CHECK(f.conversion_se == Approx(1.0 / std::sqrt(-curvature)).epsilon(1e-3));
}
