// What a reader of the report sees for each forecaster: words, not the identifiers the JSON
// report and matches.csv keep (those stay stable for programs).
#pragma once

#include <string>
#include <string_view>

namespace liveprob::report {

inline std::string forecaster_label(std::string_view id) {
    if (id == "model") return "model";
    if (id == "fixed_prior") return "pre-match forecast, held";
    if (id == "uniform_timing_no_state") return "flat timing, no state effects";
    if (id == "independent_poisson") return "independent Poisson";
    if (id == "elo_reference") return "Elo reference";
    return std::string(id);  // a column the run was given by name
}

}  // namespace liveprob::report
