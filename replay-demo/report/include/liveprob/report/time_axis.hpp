// A timeline chart's time axis that gives each period its own stretch: its nominal length plus
// the stoppage seen in it. On the running clock first-half stoppage (45:00 + 2:13 = 47.2) comes
// after the second half's start (45.0); placed by clock alone it would be drawn over the second
// half and the line would run backwards. Here it sits after the first half's 45' and before
// the second half begins, so positions only grow through a match.
#pragma once

#include <string>
#include <vector>

#include "liveprob/backtest/match_replay.hpp"

namespace liveprob::report {

struct AxisStretch {
    core::Period period = core::Period::first_half;
    double from = 0.0;     // where it begins on the axis (display minutes from kick-off)
    double start = 0.0;    // its nominal start on the running clock (minutes): 0, 45, 90, 105
    double nominal = 0.0;  // nominal length (minutes)
    double over = 0.0;     // stoppage seen in it (minutes past the nominal end)
};

class TimeAxis {
public:
    // Regulation always; extra time when the timeline reaches it.
    explicit TimeAxis(const backtest::Timeline& timeline);

    // Display minutes from kick-off of a moment of `period` at `minute` on the running clock.
    double position(core::Period period, double minute) const;
    double length() const noexcept { return length_; }
    const std::vector<AxisStretch>& stretches() const noexcept { return stretches_; }

private:
    std::vector<AxisStretch> stretches_;
    double length_ = 0.0;
};

// "45+2" for 47.2 minutes in the first half of a 45-minute half; "67" inside the period.
std::string minute_label(core::Period period, double minute, const backtest::Timeline& timeline);

}  // namespace liveprob::report
