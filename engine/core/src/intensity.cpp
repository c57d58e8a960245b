#include "liveprob/core/intensity.hpp"

#include <algorithm>
#include <cmath>
#include <limits>

namespace liveprob::core {

double state_multiplier(const ModelParams& params, Side /*side: effects are symmetric today*/,
                        int goal_diff_for_side, int own_reds, int opp_reds) {
    const ScoreStateEffects& s = params.score_state;
    const double score = goal_diff_for_side > 0   ? s.leading
                         : goal_diff_for_side < 0 ? s.trailing
                                                  : s.level;
    const int cap = std::max(0, params.red_cards.max_cards);
    const int own = std::clamp(own_reds, 0, cap);
    const int opp = std::clamp(opp_reds, 0, cap);
    return score * std::pow(params.red_cards.own_per_card, own) *
           std::pow(params.red_cards.opponent_per_card, opp);
}

StrengthPosterior strength_prior(const ModelParams& params) { return {params.kappa, params.kappa}; }

StrengthPosterior strength_posterior(const ModelParams& params, double goals,
                                     double expected_so_far, std::optional<double> xg_so_far) {
    if (std::isinf(params.kappa)) {
        const double inf = std::numeric_limits<double>::infinity();
        return {inf, inf};
    }
    StrengthPosterior post{params.kappa + goals, params.kappa + expected_so_far};
    if (xg_so_far.has_value()) {
        post.shape += params.xg_weight * *xg_so_far;
        post.rate += params.xg_weight * expected_so_far;
    }
    return post;
}

}  // namespace liveprob::core
