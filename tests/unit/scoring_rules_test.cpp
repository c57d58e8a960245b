#include <catch2/catch.hpp>

#include <cmath>

#include "liveprob/scoring/bucket_scores.hpp"
#include "liveprob/scoring/calibration.hpp"
#include "liveprob/scoring/scoring_rules.hpp"

using namespace liveprob::scoring;
using Catch::Detail::Approx;

TEST_CASE("outcome of a score", "[scoring]") {
    CHECK(outcome_of(2, 1) == Outcome::home);
    CHECK(outcome_of(0, 0) == Outcome::draw);
    CHECK(outcome_of(1, 3) == Outcome::away);
}

TEST_CASE("Brier score worked by hand from Brier's 1950 definition", "[scoring]") {
    // (0.5-0)^2 + (0.3-1)^2 + (0.2-0)^2 = 0.25 + 0.49 + 0.04
    CHECK(brier_score({0.5, 0.3, 0.2}, Outcome::draw) == Approx(0.78).epsilon(1e-14));
    CHECK(brier_score({1.0, 0.0, 0.0}, Outcome::home) == 0.0);
    CHECK(brier_score({0.0, 0.0, 1.0}, Outcome::home) == Approx(2.0));
}

TEST_CASE("log loss is the natural logarithm of the probability of what happened", "[scoring]") {
    CHECK(log_loss({0.5, 0.3, 0.2}, Outcome::draw) == Approx(-std::log(0.3)).epsilon(1e-14));
    // -ln(0.3) = 1.2039728043259361 (any table of natural logarithms)
    CHECK(log_loss({0.5, 0.3, 0.2}, Outcome::draw) == Approx(1.2039728043259361).epsilon(1e-14));
    // A forecast of zero for what happened costs -ln(floor), large but finite.
    CHECK(log_loss({1.0, 0.0, 0.0}, Outcome::away) == Approx(-std::log(kLogLossFloor)));
}

TEST_CASE("ranked probability score worked by hand from Epstein's 1969 definition", "[scoring]") {
    // RPS = 1/(r-1) * sum_{i<r} (F_i - O_i)^2 with cumulative forecast F and outcome O.
    // (0.5, 0.3, 0.2), draw: F = (0.5, 0.8), O = (0, 1): (0.25 + 0.04) / 2 = 0.145
    CHECK(ranked_probability_score({0.5, 0.3, 0.2}, Outcome::draw) == Approx(0.145).epsilon(1e-14));
    // Uniform forecast: draw (1/9 + 1/9)/2 = 1/9; home ((2/3)^2 + (1/3)^2)/2 = 5/18.
    CHECK(ranked_probability_score({1. / 3, 1. / 3, 1. / 3}, Outcome::draw) == Approx(1.0 / 9));
    CHECK(ranked_probability_score({1. / 3, 1. / 3, 1. / 3}, Outcome::home) == Approx(5.0 / 18));
    CHECK(ranked_probability_score({1.0, 0.0, 0.0}, Outcome::home) == 0.0);
    CHECK(ranked_probability_score({0.0, 0.0, 1.0}, Outcome::home) == Approx(1.0));
}

TEST_CASE("RPS rewards probability near the outcome and the Brier score does not", "[scoring]") {
    // The argument of Constantinou & Fenton (2012) for RPS in football (the pair of forecasts
    // is hand-checked here): with a home win, (0.5, 0.5, 0) is closer than (0.5, 0, 0.5).
    const Forecast near{0.5, 0.5, 0.0};
    const Forecast far{0.5, 0.0, 0.5};
    CHECK(ranked_probability_score(near, Outcome::home) == Approx(0.125));
    CHECK(ranked_probability_score(far, Outcome::home) == Approx(0.25));
    CHECK(brier_score(near, Outcome::home) == Approx(brier_score(far, Outcome::home)));
}

TEST_CASE("reliability bin k holds k/10 up to (k+1)/10 and the last bin also holds 1.0",
          "[calibration]") {
    CHECK(reliability_bin_index(0.0) == 0);
    CHECK(reliability_bin_index(0.0999) == 0);
    CHECK(reliability_bin_index(0.1) == 1);
    CHECK(reliability_bin_index(0.95) == 9);
    CHECK(reliability_bin_index(1.0) == 9);
    CHECK(reliability_bin_index(-0.2) == 0);
    CHECK(reliability_bin_index(std::nan("")) == 0);
}

TEST_CASE("expected calibration error worked by hand", "[calibration]") {
    CalibrationTable table;
    // Four forecasts of 0.7 for home, home wins three times: that bin is perfectly calibrated.
    for (int i = 0; i < 3; ++i) table.add({0.7, 0.2, 0.1}, Outcome::home);
    table.add({0.7, 0.2, 0.1}, Outcome::draw);
    CHECK(table.expected_calibration_error(Outcome::home) == Approx(0.05));  // |2.8 - 3| / 4
    // draw: forecasts 0.2 x4, happened once: |0.8 - 1| / 4 = 0.05; away: |0.4 - 0| / 4 = 0.1
    CHECK(table.expected_calibration_error(Outcome::draw) == Approx(0.05));
    CHECK(table.expected_calibration_error(Outcome::away) == Approx(0.1));
    CHECK(table.expected_calibration_error() == Approx((0.05 + 0.05 + 0.1) / 3));
    const auto& bin = table.diagram(Outcome::home)[7];
    CHECK(bin.count == 4);
    CHECK(bin.mean_forecast() == Approx(0.7));
    CHECK(bin.observed_rate() == Approx(0.75));
}

TEST_CASE("score accumulator means", "[scoring]") {
    ScoreAccumulator acc;
    acc.add({0.5, 0.3, 0.2}, Outcome::draw);
    acc.add({1.0, 0.0, 0.0}, Outcome::home);
    CHECK(acc.count() == 2);
    CHECK(acc.mean_brier() == Approx(0.39));
    CHECK(acc.mean_rps() == Approx(0.0725));
    CHECK(bucket_label(7) == "90+");
    CHECK(kBucketMinutes[6] == 85);
}
