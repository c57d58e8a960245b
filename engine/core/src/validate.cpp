#include "liveprob/core/validate.hpp"

#include <charconv>
#include <cmath>
#include <initializer_list>
#include <limits>
#include <utility>

#include "liveprob/core/quadrature.hpp"

namespace liveprob::core {

namespace {

using Problem = std::optional<InputProblem>;

// The shortest text that reads back to the same double ("15", "0.1", "nan", "inf").
std::string text(double v) {
    if (std::isnan(v)) return "nan";
    if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
    char buf[32];
    const auto r = std::to_chars(buf, buf + sizeof buf, v);
    return std::string(buf, r.ptr);
}

Problem problem(std::string field, std::string reason) {
    return InputProblem{std::move(field), std::move(reason)};
}

// v in [lo, hi] (or (lo, hi] when `open_low`), and finite.
Problem within(double v, const char* field, double lo, double hi, bool open_low = false) {
    const bool ok = std::isfinite(v) && (open_low ? v > lo : v >= lo) && v <= hi;
    if (ok) return std::nullopt;
    return problem(field, std::string("must be in ") + (open_low ? "(" : "[") + text(lo) + ", " +
                              text(hi) + "], got " + text(v));
}

Problem whole_within(long v, const char* field, long lo, long hi) {
    if (v >= lo && v <= hi) return std::nullopt;
    return problem(field, "must be " + std::to_string(lo) + ".." + std::to_string(hi) + ", got " +
                              std::to_string(v));
}

}  // namespace

std::string InputProblem::describe() const { return field + ": " + reason; }

Problem validate_prior(const PriorMeans& prior) {
    if (auto p = within(prior.home_goals, "prior.home", 0.0, kMaxPriorGoals, true)) return p;
    return within(prior.away_goals, "prior.away", 0.0, kMaxPriorGoals, true);
}

Problem validate_format(const CompetitionFormat& format) {
    if (auto p = whole_within(format.half_minutes, "half_minutes", 1, kMaxHalfMinutes)) return p;
    if (format.extra_time) {
        return whole_within(format.extra_half_minutes, "extra_half_minutes", 1,
                            kMaxExtraHalfMinutes);
    }
    return std::nullopt;
}

Problem validate_setup(const MatchSetup& setup) {
    if (setup.prior) {
        if (auto p = validate_prior(*setup.prior)) return p;
    }
    return validate_format(setup.format);
}

Problem validate_params(const ModelParams& params) {
    const TimingProfile& t = params.timing;
    for (const auto& [v, field] : std::initializer_list<std::pair<double, const char*>>{
             {t.first_half_start, "timing.first_half_start"},
             {t.first_half_end, "timing.first_half_end"},
             {t.second_half_start, "timing.second_half_start"},
             {t.second_half_end, "timing.second_half_end"},
             {t.stoppage_factor, "timing.stoppage_factor"},
             {t.extra_time_factor, "timing.extra_time_factor"}}) {
        if (auto p = within(v, field, 0.0, kMaxRate)) return p;
    }
    if (!(t.first_half_start + t.first_half_end + t.second_half_start + t.second_half_end > 0.0)) {
        return problem("timing",
                       "the regulation rates must not all be 0 (no goal could be scored)");
    }
    if (auto p = within(t.expected_stoppage_first, "timing.expected_stoppage_first", 0.0,
                        kMaxStoppageMinutes))
        return p;
    if (auto p = within(t.expected_stoppage_second, "timing.expected_stoppage_second", 0.0,
                        kMaxStoppageMinutes))
        return p;
    if (auto p = within(t.expected_stoppage_extra, "timing.expected_stoppage_extra", 0.0,
                        kMaxExtraStoppageMinutes))
        return p;
    if (auto p = within(t.overrun_minutes, "timing.overrun_minutes", 0.0, kMaxExtraStoppageMinutes))
        return p;
    const ScoreStateEffects& s = params.score_state;
    for (const auto& [v, field] : std::initializer_list<std::pair<double, const char*>>{
             {s.leading, "score_state.leading"},
             {s.level, "score_state.level"},
             {s.trailing, "score_state.trailing"},
             {params.red_cards.own_per_card, "red_cards.own_per_card"},
             {params.red_cards.opponent_per_card, "red_cards.opponent_per_card"}}) {
        if (auto p = within(v, field, 0.0, kMaxRateMultiplier, true)) return p;
    }
    if (auto p =
            whole_within(params.red_cards.max_cards, "red_cards.max_cards", 0, kMaxRedCardsCounted))
        return p;
    // Each side's conversion (the first kicker's with its edge) must leave both outcomes possible.
    const ShootoutParams& k = params.shootout;
    if (!(std::isfinite(k.conversion) && k.conversion > 0.0 && k.conversion < 1.0))
        return problem("shootout.conversion", "must be in (0, 1), got " + text(k.conversion));
    if (auto p = within(k.first_kicker_edge, "shootout.first_kicker_edge", -1.0, 1.0)) return p;
    const double first = k.conversion + k.first_kicker_edge;
    if (!(first > 0.0 && first < 1.0)) {
        return problem("shootout.first_kicker_edge",
                       "conversion + first_kicker_edge must lie in (0, 1), got " + text(first));
    }
    if (!(params.kappa == std::numeric_limits<double>::infinity())) {
        if (auto p = within(params.kappa, "kappa", kMinKappa, kMaxKappa)) return p;
    }
    if (auto p = within(params.xg_weight, "xg_weight", 0.0, kMaxXgWeight)) return p;
    return whole_within(params.quadrature_nodes, "quadrature_nodes", 1, kMaxQuadratureNodes);
}

}  // namespace liveprob::core
