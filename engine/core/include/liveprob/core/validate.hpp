// The engine's limits on what it is given, written once: every layer that takes a setup or model
// parameters from outside (the wire checks, the JSON feed reader, check-feed, the parameter file,
// the command line, the C ABI) asks these functions, so anything one layer accepts the engine
// accepts too. Each problem names the field as the feed's JSON lines (setups) or the parameter
// file (parameters) spell it.
#pragma once

#include <cstdint>
#include <optional>
#include <string>

#include "liveprob/core/messages.hpp"
#include "liveprob/core/params.hpp"

namespace liveprob::core {

// Expected regulation goals of one side: the bound the score chain's truncation is checked to
// (pricing keeps the lost mass below 1e-15 up to it).
inline constexpr double kMaxPriorGoals = 10.0;
inline constexpr std::uint16_t kMaxHalfMinutes = 60;       // bounds of plausibility (common
inline constexpr std::uint16_t kMaxExtraHalfMinutes = 30;  // practice: reject, do not clamp)
// A score-state or red-card multiplier: far beyond any published estimate (about 0.6 to 1.4),
// well inside what the score chain handles (the project's choice).
inline constexpr double kMaxRateMultiplier = 10.0;
inline constexpr double kMaxRate = 1e6;              // a timing-profile rate (relative units)
inline constexpr double kMaxStoppageMinutes = 45.0;  // expected stoppage of a regulation half
inline constexpr double kMaxExtraStoppageMinutes = 15.0;
inline constexpr int kMaxRedCardsCounted = 11;
inline constexpr double kMinKappa = 1e-9;  // strength dispersion: (kMinKappa, kMaxKappa] or inf
inline constexpr double kMaxKappa = 1e12;
inline constexpr double kMaxXgWeight = 1e6;

struct InputProblem {
    std::string field;   // "prior.home", "half_minutes", "shootout.conversion", ...
    std::string reason;  // "must be in (0, 10], got 15"

    std::string describe() const;  // "prior.home: must be in (0, 10], got 15"
};

[[nodiscard]] std::optional<InputProblem> validate_prior(const PriorMeans& prior);
[[nodiscard]] std::optional<InputProblem> validate_format(const CompetitionFormat& format);
// The prior (when present) and the format; names and the prior/ratings choice are the wire's.
[[nodiscard]] std::optional<InputProblem> validate_setup(const MatchSetup& setup);
[[nodiscard]] std::optional<InputProblem> validate_params(const ModelParams& params);

}  // namespace liveprob::core
