// Small helpers for tests of the pricing model: a pricing state from a few numbers, and the
// SciPy reference script's output as numbers.
#pragma once

#include <limits>
#include <sstream>
#include <string>
#include <vector>

#include "liveprob/core/pricing.hpp"
#include "test_env.hpp"

namespace liveprob::test {

inline core::PricingState pricing_state(double home_goals, double away_goals,
                                        core::MatchClock clock, int home_score = 0,
                                        int away_score = 0) {
    core::PricingState s;
    s.prior = {home_goals, away_goals};
    s.status = clock.period == core::Period::pre_match ? core::MatchStatus::not_started
                                                       : core::MatchStatus::in_play;
    s.clock = clock;
    s.goals = {home_score, away_score};
    const double inf = std::numeric_limits<double>::infinity();
    s.theta_shape = {inf, inf};
    s.theta_rate = {inf, inf};
    return s;
}

inline core::MatchClock at_minute(core::Period p, double minute) {
    return {p, static_cast<std::uint32_t>(minute * 60'000.0)};
}

// Runs tests/reference/scripts/count_distributions.py with Debian's Python (SciPy) and returns
// the printed numbers; an empty result means the script failed (the caller's REQUIRE fails).
inline std::vector<double> scipy_values(const std::string& args) {
    const auto script = source_dir() / "tests/reference/scripts/count_distributions.py";
    const CommandResult r = run_command(system_python() + " " + script.string() + " " + args);
    std::vector<double> values;
    if (r.exit_code != 0) return values;
    std::istringstream in(r.out);
    double v = 0.0;
    while (in >> v) values.push_back(v);
    return values;
}

}  // namespace liveprob::test
