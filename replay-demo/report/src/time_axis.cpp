#include "liveprob/report/time_axis.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <utility>

namespace liveprob::report {

namespace {

// Nominal [start, end) of a period with a clock on the running clock, in minutes.
std::pair<double, double> bounds(core::Period period, const backtest::Timeline& t) {
    const double h = t.half_minutes, e = t.extra_half_minutes;
    switch (period) {
        case core::Period::first_half: return {0.0, h};
        case core::Period::second_half: return {h, 2 * h};
        case core::Period::extra_first: return {2 * h, 2 * h + e};
        case core::Period::extra_second: return {2 * h + e, 2 * h + 2 * e};
        default: return {0.0, 0.0};
    }
}

}  // namespace

TimeAxis::TimeAxis(const backtest::Timeline& t) {
    bool extra = false;
    auto seen_over = [&](core::Period period, double minute) {
        if (period == core::Period::extra_first || period == core::Period::extra_second)
            extra = true;
        return std::max(0.0, minute - bounds(period, t).second);
    };
    std::array<double, 5> over{};
    for (const auto& p : t.points) {
        const auto i = static_cast<std::size_t>(p.period);
        if (i >= 1 && i <= 4) over[i] = std::max(over[i], seen_over(p.period, p.minute));
    }
    for (const auto& m : t.marks) {
        const auto i = static_cast<std::size_t>(m.period);
        if (i >= 1 && i <= 4) over[i] = std::max(over[i], seen_over(m.period, m.minute));
    }
    const int last = extra ? 4 : 2;
    for (int i = 1; i <= last; ++i) {
        const auto period = static_cast<core::Period>(i);
        const auto [start, end] = bounds(period, t);
        stretches_.push_back(
            {period, length_, start, end - start, over[static_cast<std::size_t>(i)]});
        length_ += end - start + over[static_cast<std::size_t>(i)];
    }
}

double TimeAxis::position(core::Period period, double minute) const {
    if (period == core::Period::pre_match) return 0.0;
    for (const auto& s : stretches_) {
        if (s.period == period)
            return s.from + std::clamp(minute - s.start, 0.0, s.nominal + s.over);
    }
    return length_;  // shoot-out or finished: the end
}

std::string minute_label(core::Period period, double minute, const backtest::Timeline& t) {
    const auto [start, end] = bounds(period, t);
    if (end > start && minute > end)
        return fmt::format("{:.0f}+{:.0f}", end, std::ceil(minute - end));
    return fmt::format("{:.0f}", minute);
}

}  // namespace liveprob::report
