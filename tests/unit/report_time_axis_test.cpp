// The report's timeline axis: stoppage time gets its own room after its period's nominal end,
// so a match's positions only grow through the match (no line drawn backwards at 45' or 90').
#include <catch2/catch.hpp>

#include "liveprob/report/time_axis.hpp"

using namespace liveprob;
using core::Period;

namespace {
backtest::Timeline timeline_of(std::initializer_list<std::pair<Period, double>> moments) {
    backtest::Timeline t;
    for (const auto& [period, minute] : moments) t.points.push_back({minute, {}, period});
    return t;
}
}  // namespace

TEST_CASE("report time axis: first-half stoppage sits before the second half", "[report]") {
    // 47.2 on the running clock is 45+2:12 of the first half; 45.5 is early in the second.
    const auto t = timeline_of({{Period::pre_match, 0.0},
                                {Period::first_half, 30.0},
                                {Period::first_half, 47.2},
                                {Period::second_half, 45.5},
                                {Period::second_half, 93.0}});
    const report::TimeAxis axis(t);
    REQUIRE(axis.stretches().size() == 2);  // regulation only: no extra time reached
    CHECK(axis.stretches()[0].over == Approx(2.2));
    CHECK(axis.stretches()[1].over == Approx(3.0));
    CHECK(axis.length() == Approx(90.0 + 2.2 + 3.0));
    double previous = -1.0;
    for (const auto& p : t.points) {
        const double at = axis.position(p.period, p.minute);
        CHECK(at > previous);
        previous = at;
    }
    CHECK(axis.position(Period::second_half, 45.0) == Approx(45.0 + 2.2));
    CHECK(report::minute_label(Period::first_half, 47.2, t) == "45+3");
    CHECK(report::minute_label(Period::second_half, 67.0, t) == "67");
}

TEST_CASE("report time axis: extra time gets its own stretches once reached", "[report]") {
    auto t = timeline_of(
        {{Period::second_half, 95.0}, {Period::extra_first, 106.5}, {Period::extra_second, 121.0}});
    t.half_minutes = 40;  // a format with shorter halves: its own nominal ends
    t.extra_half_minutes = 10;
    const report::TimeAxis axis(t);
    REQUIRE(axis.stretches().size() == 4);
    CHECK(axis.stretches()[1].over == Approx(15.0));  // 95 against a nominal end of 80
    CHECK(axis.stretches()[2].start == Approx(80.0));
    CHECK(axis.stretches()[2].over == Approx(16.5));  // 106.5 against 90
    CHECK(axis.position(Period::extra_second, 90.0) < axis.position(Period::extra_second, 121.0));
    CHECK(axis.position(Period::extra_first, 100.0) < axis.position(Period::extra_second, 90.0));
    CHECK(axis.position(Period::shootout, 0.0) == Approx(axis.length()));
}
