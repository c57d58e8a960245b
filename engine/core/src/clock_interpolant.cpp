#include "liveprob/core/clock_interpolant.hpp"

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <numbers>

#include "liveprob/core/settle_rounding.hpp"

namespace liveprob::core {

namespace {

// Visits every output that moves with the clock, in the one order the stored values use.
template <class OutputsT, class Visit>
void for_each_value(OutputsT& out, Visit&& visit) {
    for (auto* p : {&out.p_home, &out.p_draw, &out.p_away, &out.p_advance_home, &out.p_advance_away,
                    &out.expected_home_goals, &out.expected_away_goals, &out.next_goal_home,
                    &out.next_goal_away, &out.next_goal_none}) {
        visit(*p);
    }
    for (auto& p : out.p_over) visit(p);
    visit(out.p_both_score);
    for (auto& row : out.goals_added) {
        for (auto& p : row) visit(p);
    }
    visit(out.tail_mass);
}

}  // namespace

void ClockInterpolant::begin(std::uint64_t epoch, Period period, std::uint32_t from_ms,
                             std::uint32_t to_ms) {
    epoch_ = epoch;
    period_ = period;
    from_ms_ = from_ms;
    to_ms_ = std::clamp(to_ms, from_ms, from_ms + kLongestWindowMs);
    solved_ = 0;
    if (to_ms_ - from_ms_ < kShortestWindowMs) {
        phase_ = Phase::refused;
        return;
    }
    // Chebyshev points of the first kind, rounded to the clock's whole milliseconds; the
    // weights are then those of the rounded points, so the polynomial still passes through
    // every solve exactly.
    const double half_span = 0.5 * static_cast<double>(to_ms_ - from_ms_);
    for (std::size_t j = 0; j < kNodes; ++j) {
        const double x = std::cos(std::numbers::pi * (static_cast<double>(j) + 0.5) /
                                  static_cast<double>(kNodes));
        node_ms_[j] = from_ms_ + static_cast<std::uint32_t>(std::lround(half_span * (x + 1.0)));
    }
    for (std::size_t j = 0; j < kNodes; ++j) node_x_[j] = unit(node_ms_[j]);
    for (std::size_t j = 0; j < kNodes; ++j) {
        double product = 1.0;
        for (std::size_t k = 0; k < kNodes; ++k) {
            if (k != j) product *= node_x_[j] - node_x_[k];
        }
        weight_[j] = 1.0 / product;
    }
    // The check: halfway between the two middle nodes, where no node is.
    check_ms_ = node_ms_[kNodes / 2] / 2 + node_ms_[kNodes / 2 + 1] / 2;
    phase_ = Phase::filling;
}

bool ClockInterpolant::covers(std::uint64_t epoch, MatchClock clock) const noexcept {
    return phase_ != Phase::none && epoch == epoch_ && clock.period == period_ &&
           clock.clock_ms >= from_ms_ && clock.clock_ms <= to_ms_;
}

MatchClock ClockInterpolant::next_solve() const noexcept {
    if (phase_ == Phase::checking) return {period_, check_ms_};
    return {period_, node_ms_[std::min(solved_, kNodes - 1)]};
}

void ClockInterpolant::record(const Outputs& exact) {
    if (phase_ == Phase::filling) {
        Values& into = values_[solved_];
        std::size_t k = 0;
        for_each_value(exact, [&](const double& v) { into[k++] = v; });
        has_advance_ = exact.has_advance;
        if (++solved_ == kNodes) phase_ = Phase::checking;
        return;
    }
    if (phase_ != Phase::checking) return;
    Values interpolated;
    combine(check_ms_, interpolated);
    double worst = 0.0;
    std::size_t k = 0;
    for_each_value(
        exact, [&](const double& v) { worst = std::max(worst, std::abs(v - interpolated[k++])); });
    if (worst <= kCheckTolerance) {
        phase_ = Phase::ready;
    } else {
        phase_ = Phase::refused;
        failed_checks_ += 1;
    }
}

double ClockInterpolant::unit(std::uint32_t clock_ms) const noexcept {
    const double span = static_cast<double>(to_ms_ - from_ms_);
    return 2.0 * static_cast<double>(clock_ms - from_ms_) / span - 1.0;
}

void ClockInterpolant::combine(std::uint32_t clock_ms, Values& into) const noexcept {
    std::array<double, kNodes> c{};
    const double x = unit(clock_ms);
    double sum = 0.0;
    for (std::size_t j = 0; j < kNodes; ++j) {
        if (clock_ms == node_ms_[j]) {  // on a node: its own solve, bit for bit
            into = values_[j];
            return;
        }
        c[j] = weight_[j] / (x - node_x_[j]);
        sum += c[j];
    }
    for (double& cj : c) cj /= sum;
    blend_nodes(c, values_, into);
}

void ClockInterpolant::evaluate(std::uint32_t clock_ms, Outputs& out) const noexcept {
    Values values;
    combine(clock_ms, values);
    std::size_t k = 0;
    for_each_value(out, [&](double& v) { v = values[k++]; });
    out.has_advance = has_advance_;
    settle_rounding(out);
}

}  // namespace liveprob::core
