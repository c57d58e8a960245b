// log k! for the fits' Poisson likelihoods.
#pragma once

#include <cmath>

namespace liveprob::fit {

// lgamma_r, not std::lgamma: std::lgamma also writes the C library's global `signgam`, a data
// race when fits run on several threads at once (the walk-forward chains do; the thread
// sanitizer reports it).
inline double log_factorial(double k) {
    int sign = 0;
    return ::lgamma_r(k + 1.0, &sign);
}

}  // namespace liveprob::fit
