// The pricing model: from the current match state to every published probability.
// Pure computation. A model holds only its parameters and a small cache (about half a
// kilobyte); the buffers a call works in are kept once per thread and shared by all models on
// it, allocated by the thread's first call, so price() allocates nothing after that.
#pragma once

#include <array>
#include <memory>
#include <optional>

#include "liveprob/core/messages.hpp"
#include "liveprob/core/outputs.hpp"
#include "liveprob/core/params.hpp"

namespace liveprob::core {

struct ShootoutState {
    std::array<int, 2> taken{};  // kicks taken per side (index by liveprob::index(Side))
    std::array<int, 2> scored{};
    Side first = Side::home;  // side that kicks first
};

struct PricingState {
    CompetitionFormat format;
    PriorMeans prior;  // λ_H, λ_A: expected regulation goals
    MatchStatus status = MatchStatus::not_started;
    MatchClock clock;  // now; during an interval the START of the next period
    std::optional<double> announced_stoppage_minutes;  // for the current period, if announced
    std::array<int, 2> goals{};                        // current score (this match)
    std::array<int, 2> reds{};
    std::array<double, 2> theta_shape{}, theta_rate{};  // Gamma posterior of θ_X;
                                                        // shape = +inf means θ = 1 exactly (κ = ∞)
    ShootoutState shootout;  // meaningful when status == shootout
};

class PricingModel {
public:
    explicit PricingModel(const ModelParams& params);
    ~PricingModel();
    PricingModel(PricingModel&&) noexcept;
    PricingModel& operator=(PricingModel&&) noexcept;
    PricingModel(const PricingModel&) = delete;
    PricingModel& operator=(const PricingModel&) = delete;

    // Fills the probability fields of `out` (p_home .. tail_mass; not status, clock, score or
    // events_applied, which the caller sets). Allocates nothing once the calling thread has
    // priced once.
    // status finished or abandoned: the current score is the result (probabilities 0/1).
    void price(const PricingState& state, Outputs& out);

    [[nodiscard]] const ModelParams& params() const;

private:
    void price_unsettled(const PricingState& state, Outputs& out);  // before settle_rounding

    struct Workspace;
    std::unique_ptr<Workspace> ws_;
};

}  // namespace liveprob::core
