// Fixture for the layering check (never compiled): the engine's own headers, Eigen and the
// standard library's computing headers pass.
#include <Eigen/Dense>
#include <cmath>
#include <vector>

#include "liveprob/core/pricing.hpp"
