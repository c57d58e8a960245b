#include "liveprob/scoring/calibration_null.hpp"

#include <algorithm>
#include <random>
#include <vector>

#include "liveprob/scoring/calibration.hpp"

namespace liveprob::scoring {

CalibratedEce calibrated_forecaster_ece(std::span<const Forecast> forecasts, int draws,
                                        std::uint64_t seed) {
    CalibratedEce out;
    if (forecasts.empty() || draws <= 0) return out;
    std::mt19937_64 generator(seed);
    std::vector<double> eces;
    eces.reserve(static_cast<std::size_t>(draws));
    for (int d = 0; d < draws; ++d) {
        CalibrationTable table;
        for (const auto& f : forecasts) {
            // A uniform in [0, 1) from the top 53 bits.
            const double u = static_cast<double>(generator() >> 11) * 0x1.0p-53;
            const Outcome o = u < f[0]          ? Outcome::home
                              : u < f[0] + f[1] ? Outcome::draw
                                                : Outcome::away;
            table.add(f, o);
        }
        eces.push_back(table.expected_calibration_error());
    }
    double sum = 0.0;
    for (const double e : eces) sum += e;
    std::sort(eces.begin(), eces.end());
    out.draws = draws;
    out.mean = sum / static_cast<double>(draws);
    out.p95 = eces[std::min(eces.size() - 1,
                            static_cast<std::size_t>(0.95 * static_cast<double>(eces.size())))];
    return out;
}

}  // namespace liveprob::scoring
