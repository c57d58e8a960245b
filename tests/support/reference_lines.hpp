// Reading what the reference scripts print: one "name value standard_error" line per quantity
// ("nan" where a quantity has no standard error).
#pragma once

#include <cmath>
#include <map>
#include <sstream>
#include <string>

namespace liveprob::test {

struct ReferenceValue {
    double value = 0.0;
    double se = 0.0;  // NaN when the script gives none
};

inline std::map<std::string, ReferenceValue> parse_reference_lines(const std::string& text) {
    std::map<std::string, ReferenceValue> out;
    std::istringstream lines(text);
    std::string name, value, se;
    while (lines >> name >> value >> se)
        out[name] = {std::stod(value), se == "nan" ? std::nan("") : std::stod(se)};
    return out;
}

}  // namespace liveprob::test
