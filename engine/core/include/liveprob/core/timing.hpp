// The goal-timing profile r(t) on the match clock: how much scoring "exposure" each stretch of
// play carries. Exposures are in units of a whole regulation match, so a side with expected
// regulation goals λ expects λ · exposure(a, b) goals between clock points a and b.
#pragma once

#include <array>
#include <cstdint>
#include <optional>

#include "liveprob/core/messages.hpp"
#include "liveprob/core/params.hpp"

namespace liveprob::core {

class TimingCurve {
public:
    TimingCurve(const TimingProfile& profile, const CompetitionFormat& format);

    // Relative rate at a clock point (per minute of play), scaled so that a whole regulation
    // match with the expected stoppage carries exposure exactly 1. A clock past the period's
    // nominal end is stoppage time. Outside play (pre-match, shoot-out, finished) the rate is 0.
    [[nodiscard]] double rate(MatchClock c) const;

    // ∫ r dt within one period between two clock readings (ms on the running clock; either
    // may lie in that period's stoppage). Order-insensitive in the sense that to <= from gives 0.
    [[nodiscard]] double period_exposure(Period period, std::uint32_t from_ms,
                                         std::uint32_t to_ms) const;

    // ∫ r dt between two clock points. Within one period this is period_exposure. Across
    // periods, the rest of `from`'s period is counted up to its nominal end plus expected
    // stoppage (or up to `from` if it is already later), whole periods in between with their
    // expected stoppage, and the start of `to`'s period up to `to`. For exact accounting split
    // at the clock reading each period actually ended on.
    [[nodiscard]] double exposure(MatchClock from, MatchClock to) const;

    // Exposure still to come in regulation from `now`. `announced_stoppage_minutes` is the
    // stoppage shown for the CURRENT period (expected stoppage when absent). When the clock is
    // already past the end of the current period's stoppage, the rest of that period counts as
    // `TimingProfile::overrun_minutes` at the stoppage rate.
    [[nodiscard]] double remaining_regulation(
        MatchClock now, std::optional<double> announced_stoppage_minutes) const;

    // Exposure still to come in extra time from `now` (the whole of extra time while in
    // regulation; 0 when the format plays none or it is over). Same stoppage rules as above.
    [[nodiscard]] double remaining_extra_time(
        MatchClock now, std::optional<double> announced_stoppage_minutes) const;

    // The last clock reading (ms) of the stretch that begins at `now` over which rate(), the
    // exposure since any earlier point of the period and both remaining exposures are smooth
    // (polynomial) in the clock: up to the period's nominal end; in stoppage, up to where the
    // overrun takes over from the stoppage still expected (`announced_stoppage_minutes` as for
    // remaining_regulation); after that to the end of the period (UINT32_MAX). Interpolating
    // outputs in the clock is exact to rounding only inside such a stretch.
    [[nodiscard]] std::uint32_t smooth_until_ms(
        MatchClock now, std::optional<double> announced_stoppage_minutes) const;

    // Nominal start and end of a period on the running clock, in minutes (e.g. 45 and 90 for
    // the second half); both 0 for periods without play.
    [[nodiscard]] double period_start_minutes(Period p) const;
    [[nodiscard]] double period_end_minutes(Period p) const;
    [[nodiscard]] double expected_stoppage_minutes(Period p) const;

private:
    struct Segment {
        double start_min = 0.0;   // nominal start on the running clock
        double end_min = 0.0;     // nominal end
        double rate_start = 0.0;  // scaled rate at start and nominal end (linear between)
        double rate_end = 0.0;
        double stoppage_rate = 0.0;
        double expected_stoppage = 0.0;
    };
    static constexpr int kPlayedPeriods = 4;  // first_half .. extra_second
    const Segment* segment(Period p) const noexcept;
    double segment_integral(const Segment& s, double from_min, double to_min) const noexcept;
    double rest_of_period(const Segment& s, double now_min,
                          std::optional<double> announced) const noexcept;
    double whole_period(const Segment& s) const noexcept;

    TimingProfile profile_;
    bool extra_time_ = false;
    std::array<Segment, kPlayedPeriods> segments_{};
};

}  // namespace liveprob::core
