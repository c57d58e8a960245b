#include "liveprob/core/timing.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

namespace liveprob::core {
namespace {

constexpr double kMsPerMinute = 60'000.0;

double minutes(std::uint32_t ms) { return static_cast<double>(ms) / kMsPerMinute; }

bool is_played(Period p) { return p >= Period::first_half && p <= Period::extra_second; }

int slot(Period p) { return static_cast<int>(p) - static_cast<int>(Period::first_half); }

void require(bool ok, const char* what) {
    if (!ok) throw std::invalid_argument(what);
}

}  // namespace

TimingCurve::TimingCurve(const TimingProfile& profile, const CompetitionFormat& format)
    : profile_(profile), extra_time_(format.extra_time) {
    require(format.half_minutes > 0, "timing: half_minutes must be positive");
    require(profile.first_half_start >= 0 && profile.first_half_end >= 0 &&
                profile.second_half_start >= 0 && profile.second_half_end >= 0 &&
                profile.stoppage_factor >= 0 && profile.extra_time_factor >= 0,
            "timing: rates must be non-negative");
    require(profile.expected_stoppage_first >= 0 && profile.expected_stoppage_second >= 0 &&
                profile.expected_stoppage_extra >= 0 && profile.overrun_minutes >= 0,
            "timing: stoppage minutes must be non-negative");
    const double half = format.half_minutes;
    const double extra = format.extra_half_minutes;
    const double et_rate = profile.extra_time_factor * profile.second_half_end;
    segments_[0] = {0.0,
                    half,
                    profile.first_half_start,
                    profile.first_half_end,
                    profile.stoppage_factor * profile.first_half_end,
                    profile.expected_stoppage_first};
    segments_[1] = {half,
                    2 * half,
                    profile.second_half_start,
                    profile.second_half_end,
                    profile.stoppage_factor * profile.second_half_end,
                    profile.expected_stoppage_second};
    segments_[2] = {2 * half,
                    2 * half + extra,
                    et_rate,
                    et_rate,
                    profile.stoppage_factor * et_rate,
                    profile.expected_stoppage_extra};
    segments_[3] = {2 * half + extra,
                    2 * half + 2 * extra,
                    et_rate,
                    et_rate,
                    profile.stoppage_factor * et_rate,
                    profile.expected_stoppage_extra};
    // Scale so that a whole regulation match with expected stoppage carries exposure 1: the
    // prior means are then expected regulation goals.
    const double total = whole_period(segments_[0]) + whole_period(segments_[1]);
    require(total > 0, "timing: the regulation rate is zero everywhere");
    for (Segment& s : segments_) {
        s.rate_start /= total;
        s.rate_end /= total;
        s.stoppage_rate /= total;
    }
}

const TimingCurve::Segment* TimingCurve::segment(Period p) const noexcept {
    if (!is_played(p)) return nullptr;
    return &segments_[static_cast<std::size_t>(slot(p))];
}

// ∫ r over [from, to] minutes of the running clock: linear inside the nominal period, flat at
// the stoppage rate beyond its end.
double TimingCurve::segment_integral(const Segment& s, double from_min,
                                     double to_min) const noexcept {
    const double a = std::max(from_min, s.start_min);
    const double b = to_min;
    if (b <= a) return 0.0;
    double sum = 0.0;
    const double in_a = a;
    const double in_b = std::min(b, s.end_min);
    if (in_b > in_a) {
        const double span = s.end_min - s.start_min;
        const double slope = span > 0 ? (s.rate_end - s.rate_start) / span : 0.0;
        const double ra = s.rate_start + slope * (in_a - s.start_min);
        const double rb = s.rate_start + slope * (in_b - s.start_min);
        sum += 0.5 * (ra + rb) * (in_b - in_a);
    }
    const double st_a = std::max(a, s.end_min);
    if (b > st_a) sum += s.stoppage_rate * (b - st_a);
    return sum;
}

double TimingCurve::whole_period(const Segment& s) const noexcept {
    return segment_integral(s, s.start_min, s.end_min + s.expected_stoppage);
}

double TimingCurve::rest_of_period(const Segment& s, double now_min,
                                   std::optional<double> announced) const noexcept {
    const double stoppage = announced.has_value() ? std::max(0.0, *announced) : s.expected_stoppage;
    const double now = std::max(now_min, s.start_min);
    // Never less than the overrun: play runs on a little past the board.
    const double finish =
        std::max(s.end_min + stoppage, std::max(now, s.end_min) + profile_.overrun_minutes);
    return segment_integral(s, now, finish);
}

double TimingCurve::rate(MatchClock c) const {
    const Segment* s = segment(c.period);
    if (s == nullptr) return 0.0;
    const double t = std::max(minutes(c.clock_ms), s->start_min);
    if (t >= s->end_min) return s->stoppage_rate;
    const double span = s->end_min - s->start_min;
    return s->rate_start + (s->rate_end - s->rate_start) * (t - s->start_min) / span;
}

double TimingCurve::period_exposure(Period period, std::uint32_t from_ms,
                                    std::uint32_t to_ms) const {
    const Segment* s = segment(period);
    if (s == nullptr) return 0.0;
    return segment_integral(*s, minutes(from_ms), minutes(to_ms));
}

double TimingCurve::exposure(MatchClock from, MatchClock to) const {
    if (from.period == Period::pre_match) from = {Period::first_half, 0};
    const Period last_played = extra_time_ ? Period::extra_second : Period::second_half;
    if (to.period > last_played) {  // shoot-out or finished: up to the end of the last period
        const Segment& s = *segment(last_played);
        to = {last_played,
              static_cast<std::uint32_t>((s.end_min + s.expected_stoppage) * kMsPerMinute)};
    }
    if (!is_played(from.period) || !is_played(to.period)) return 0.0;
    if (to.period < from.period) return 0.0;
    if (from.period == to.period) return period_exposure(from.period, from.clock_ms, to.clock_ms);
    const Segment& first = *segment(from.period);
    const double from_min = minutes(from.clock_ms);
    double sum = segment_integral(first, from_min,
                                  std::max(from_min, first.end_min + first.expected_stoppage));
    for (int p = slot(from.period) + 1; p < slot(to.period); ++p) {
        sum += whole_period(segments_[static_cast<std::size_t>(p)]);
    }
    const Segment& last = *segment(to.period);
    sum += segment_integral(last, last.start_min, minutes(to.clock_ms));
    return sum;
}

double TimingCurve::remaining_regulation(MatchClock now, std::optional<double> announced) const {
    switch (now.period) {
        case Period::pre_match: return whole_period(segments_[0]) + whole_period(segments_[1]);
        case Period::first_half:
            return rest_of_period(segments_[0], minutes(now.clock_ms), announced) +
                   whole_period(segments_[1]);
        case Period::second_half:
            return rest_of_period(segments_[1], minutes(now.clock_ms), announced);
        default: return 0.0;
    }
}

double TimingCurve::remaining_extra_time(MatchClock now, std::optional<double> announced) const {
    if (!extra_time_) return 0.0;
    switch (now.period) {
        case Period::pre_match:
        case Period::first_half:
        case Period::second_half: return whole_period(segments_[2]) + whole_period(segments_[3]);
        case Period::extra_first:
            return rest_of_period(segments_[2], minutes(now.clock_ms), announced) +
                   whole_period(segments_[3]);
        case Period::extra_second:
            return rest_of_period(segments_[3], minutes(now.clock_ms), announced);
        default: return 0.0;
    }
}

std::uint32_t TimingCurve::smooth_until_ms(MatchClock now, std::optional<double> announced) const {
    const Segment* s = segment(now.period);
    if (s == nullptr) return now.clock_ms;
    const double t = minutes(now.clock_ms);
    double kink = s->end_min;  // the rate turns flat: the stoppage rate
    if (t >= kink) {
        // rest_of_period's finish, max(end + stoppage, now + overrun), changes form here.
        const double stoppage =
            announced.has_value() ? std::max(0.0, *announced) : s->expected_stoppage;
        kink = s->end_min + stoppage - profile_.overrun_minutes;
        if (t >= kink) return std::numeric_limits<std::uint32_t>::max();
    }
    return static_cast<std::uint32_t>(std::floor(kink * kMsPerMinute));
}

double TimingCurve::period_start_minutes(Period p) const {
    const Segment* s = segment(p);
    return s ? s->start_min : 0.0;
}

double TimingCurve::period_end_minutes(Period p) const {
    const Segment* s = segment(p);
    return s ? s->end_min : 0.0;
}

double TimingCurve::expected_stoppage_minutes(Period p) const {
    const Segment* s = segment(p);
    return s ? s->expected_stoppage : 0.0;
}

}  // namespace liveprob::core
