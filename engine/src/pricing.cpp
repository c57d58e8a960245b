// The pricing model. Two paths give the same answer where both apply:
//  - independent: no score-state effect (red cards only scale the rates, which stay constant
//    until the next event), so each side's goals to come are Poisson (θ known) or negative
//    binomial (θ Gamma-distributed), in closed form;
//  - mixture: score-state effects couple the sides; the score chain is solved per pair of
//    Gauss–Laguerre strength nodes and mixed with the quadrature weights.
#include "liveprob/engine/pricing.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <stdexcept>

#include "liveprob/engine/intensity.hpp"
#include "liveprob/engine/quadrature.hpp"
#include "liveprob/engine/score_chain.hpp"
#include "liveprob/engine/shootout.hpp"
#include "liveprob/engine/timing.hpp"

namespace liveprob {
namespace {

// Longest goal-count distribution kept for the closed forms; the mass beyond it is far below
// 1e-15 for prior means up to kMaxPriorGoals.
constexpr int kPmfLength = 96;
constexpr double kMaxPriorGoals = 10.0;

using Pmf = std::array<double, kPmfLength>;

std::size_t at(int k) { return static_cast<std::size_t>(k); }

// Below this a pmf term past the mode is dropped with everything after it (the terms fall
// geometrically there, so the dropped mass is of the same order).
constexpr double kNegligible = 1e-20;

// Goals to come: Poisson(mean) when shape is infinite, else the Gamma(shape, rate) mixture of
// Poisson(θ · mean), i.e. negative binomial with success probability rate / (rate + mean).
void goals_pmf(double mean, double shape, double rate, Pmf& pmf, Pmf& cdf) {
    const bool poisson = std::isinf(shape);
    const double p = poisson ? 0.0 : rate / (rate + mean);
    pmf[0] = poisson ? std::exp(-mean) : std::pow(p, shape);
    double c = cdf[0] = pmf[0];
    int k = 1;
    for (; k < kPmfLength; ++k) {
        const double ratio = poisson ? mean / k : (k - 1 + shape) / k * (1.0 - p);
        pmf[at(k)] = pmf[at(k - 1)] * ratio;
        cdf[at(k)] = c += pmf[at(k)];
        if (ratio < 1.0 && pmf[at(k)] < kNegligible) break;
    }
    for (++k; k < kPmfLength; ++k) {
        pmf[at(k)] = 0.0;
        cdf[at(k)] = c;
    }
}

double cdf_at(const Pmf& cdf, int k) { return k < 0 ? 0.0 : cdf[at(std::min(k, kPmfLength - 1))]; }
double pmf_at(const Pmf& pmf, int k) { return k < 0 || k >= kPmfLength ? 0.0 : pmf[at(k)]; }

struct SignSplit {
    double home = 0.0;  // X - Y + offset > 0
    double level = 0.0;
    double away = 0.0;
};

// Sign of offset + X - Y for independent X ~ px, Y ~ py.
SignSplit sign_split(const Pmf& px, const Pmf& py, const Pmf& cy, int offset) {
    SignSplit s;
    for (int x = 0; x < kPmfLength; ++x) {
        const double p = px[at(x)];
        if (p == 0.0) break;  // the rest of the pmf was dropped as negligible
        const int level_y = x + offset;  // Y equal to this gives a level result
        s.home += p * cdf_at(cy, level_y - 1);
        s.level += p * pmf_at(py, level_y);
        s.away += p * (1.0 - cdf_at(cy, level_y));
    }
    return s;
}

void require(bool ok, const char* what) {
    if (!ok) throw std::invalid_argument(what);
}

void check_posterior(double shape, double rate) {
    require(shape > 0.0 && !std::isnan(shape), "pricing: strength shape must be positive");
    require(std::isinf(shape) || (rate > 0.0 && std::isfinite(rate) && std::isfinite(shape)),
            "pricing: strength rate must be positive and finite");
}

bool settled(MatchStatus s) { return s == MatchStatus::finished || s == MatchStatus::abandoned; }

struct Phase {
    bool in_shootout = false;
    double now = 0.0;         // exposure left in the current phase (regulation or extra time)
    double extra_time = 0.0;  // exposure of extra time still to be played after it
};

Phase phase_of(const PricingState& st, const TimingCurve& tc) {
    Phase ph;
    const Period p = st.clock.period;
    ph.in_shootout = st.status == MatchStatus::shootout || p == Period::shootout || p == Period::finished;
    if (ph.in_shootout) return ph;
    if (p == Period::extra_first || p == Period::extra_second) {
        ph.now = tc.remaining_extra_time(st.clock, st.announced_stoppage_minutes);
    } else {
        ph.now = tc.remaining_regulation(st.clock, st.announced_stoppage_minutes);
        ph.extra_time = tc.remaining_extra_time(st.clock, std::nullopt);
    }
    return ph;
}

int tie_offset(const PricingState& st) {
    int d = st.goals[0] - st.goals[1];
    if (st.format.first_leg) d += st.format.first_leg->home_goals - st.format.first_leg->away_goals;
    return d;
}

// Outputs that follow from a distribution of goals added (grid plus overflow buckets). An
// overflow bucket counts at the score where it left the grid (a lower bound on later goals);
// its total is `tail_mass`.
void summarise(const ScoreGrid& g, const PricingState& st, Outputs& out) {
    const int gh = st.goals[0];
    const int ga = st.goals[1];
    out.p_home = out.p_draw = out.p_away = 0.0;
    out.p_over.fill(0.0);
    out.p_both_score = out.expected_home_goals = out.expected_away_goals = 0.0;
    auto add = [&](int home, int away, double v) {
        if (home > away) out.p_home += v;
        else if (home < away) out.p_away += v;
        else out.p_draw += v;
        for (int k = 0; k < kTotalsLines; ++k) {
            if (home + away > totals_line(k)) out.p_over[at(k)] += v;
        }
        if (home >= 1 && away >= 1) out.p_both_score += v;
        out.expected_home_goals += v * home;
        out.expected_away_goals += v * away;
    };
    for (int i = 0; i < kGrid; ++i) {
        for (int j = 0; j < kGrid; ++j) add(gh + i, ga + j, g.cell[at(i)][at(j)]);
    }
    for (int k = 0; k < kGrid; ++k) {
        add(gh + kGrid, ga + k, g.home_overflow[at(k)]);
        add(gh + k, ga + kGrid, g.away_overflow[at(k)]);
    }
    out.goals_added = g.cell;
    out.tail_mass = g.overflow_total();
}

}  // namespace

struct PricingModel::Workspace {
    ModelParams params;
    double shootout_before_toss = 0.5;
    ScoreChain chain;
    ScoreGrid node_grid;
    ScoreGrid mix;
    std::array<GammaQuadrature, 2> quad{};
    std::array<double, 2> quad_shape{std::numeric_limits<double>::quiet_NaN(),
                                     std::numeric_limits<double>::quiet_NaN()};
    std::array<Pmf, 2> pmf{}, cdf{};
    std::array<Pmf, 2> et_pmf{}, et_cdf{};

    // Strength nodes θ_k and weights of one side (θ = 1 when the shape is infinite). The
    // Gauss–Laguerre nodes depend on the shape only and are cached: between goals only the
    // rate changes, which rescales them.
    const GammaQuadrature& nodes(int side, double shape) {
        GammaQuadrature& q = quad[at(side)];
        if (std::isinf(shape)) {
            q.count = 1;
            q.node[0] = 1.0;
            q.weight[0] = 1.0;
            quad_shape[at(side)] = shape;
        } else if (!(quad_shape[at(side)] == shape)) {
            gamma_quadrature(shape, params.quadrature_nodes, q);
            quad_shape[at(side)] = shape;
        }
        return q;
    }
    static double theta(const GammaQuadrature& q, int k, double shape, double rate) {
        return std::isinf(shape) ? 1.0 : q.node[at(k)] / rate;
    }
};

PricingModel::PricingModel(const ModelParams& params) : ws_(std::make_unique<Workspace>()) {
    require(params.quadrature_nodes >= 1 && params.quadrature_nodes <= kMaxQuadratureNodes,
            "model parameters: quadrature_nodes must be between 1 and 16");
    require(params.kappa > 0.0, "model parameters: kappa must be positive (or infinite)");
    require(params.xg_weight >= 0.0, "model parameters: xg_weight must be non-negative");
    const ScoreStateEffects& s = params.score_state;
    require(s.leading > 0 && s.level > 0 && s.trailing > 0, "model parameters: score-state multipliers must be positive");
    require(params.red_cards.own_per_card > 0 && params.red_cards.opponent_per_card > 0 &&
                params.red_cards.max_cards >= 0,
            "model parameters: red-card multipliers must be positive, max_cards non-negative");
    ws_->params = params;
    ws_->shootout_before_toss = shootout_home_win_before_toss(params.shootout);  // validates
    TimingCurve check(params.timing, CompetitionFormat{});  // validates the timing profile
    (void)check;
}

PricingModel::~PricingModel() = default;
PricingModel::PricingModel(PricingModel&&) noexcept = default;
PricingModel& PricingModel::operator=(PricingModel&&) noexcept = default;

const ModelParams& PricingModel::params() const { return ws_->params; }

void PricingModel::price(const PricingState& st, Outputs& out) {
    Workspace& w = *ws_;
    const ModelParams& prm = w.params;
    require(std::isfinite(st.prior.home_goals) && std::isfinite(st.prior.away_goals) &&
                st.prior.home_goals >= 0.0 && st.prior.away_goals >= 0.0 &&
                st.prior.home_goals <= kMaxPriorGoals && st.prior.away_goals <= kMaxPriorGoals,
            "pricing: expected regulation goals must lie in [0, 10]");
    require(st.goals[0] >= 0 && st.goals[1] >= 0 && st.reds[0] >= 0 && st.reds[1] >= 0,
            "pricing: goals and red cards must be non-negative");
    check_posterior(st.theta_shape[0], st.theta_rate[0]);
    check_posterior(st.theta_shape[1], st.theta_rate[1]);

    out.has_advance = st.format.needs_winner() && st.status != MatchStatus::abandoned;
    out.p_advance_home = out.p_advance_away = 0.0;
    out.next_goal_home = out.next_goal_away = 0.0;
    out.next_goal_none = 1.0;
    const int tie0 = tie_offset(st);

    // Who wins a shoot-out, should the tie come to one (a coin toss if the format has none).
    double shootout_home = 0.5;
    if (st.format.shootout) {
        shootout_home = st.status == MatchStatus::shootout ? shootout_home_win(prm.shootout, st.shootout)
                                                           : w.shootout_before_toss;
    }

    if (settled(st.status)) {
        w.mix = ScoreGrid{};
        w.mix.cell[0][0] = 1.0;
        summarise(w.mix, st, out);
        if (out.has_advance) {
            const int kick_diff = st.shootout.scored[0] - st.shootout.scored[1];
            const int decider = tie0 != 0 ? tie0 : kick_diff;
            out.p_advance_home = decider > 0 ? 1.0 : decider < 0 ? 0.0 : 0.5;
            out.p_advance_away = 1.0 - out.p_advance_home;
        }
        return;
    }

    const TimingCurve tc(prm.timing, st.format);
    const Phase ph = phase_of(st, tc);

    ClassRates base;
    for (int c = 0; c < kDiffClasses; ++c) {
        const int d = c - 1;  // home trailing, level, leading
        base.home[at(c)] = st.prior.home_goals * state_multiplier(prm, Side::home, d, st.reds[0], st.reds[1]);
        base.away[at(c)] = st.prior.away_goals * state_multiplier(prm, Side::away, -d, st.reds[1], st.reds[0]);
    }
    const bool independent = base.home[0] == base.home[1] && base.home[1] == base.home[2] &&
                             base.away[0] == base.away[1] && base.away[1] == base.away[2];

    const GammaQuadrature& qh = w.nodes(0, st.theta_shape[0]);
    const GammaQuadrature& qa = w.nodes(1, st.theta_shape[1]);

    // Next goal before the end of the current phase: the state holds until then, so per
    // strength node it is the first of two exponential clocks, mixed over the nodes.
    {
        const auto c0 = at(diff_class(tie0));
        double home = 0.0, away = 0.0;
        for (int kh = 0; kh < qh.count; ++kh) {
            const double th = Workspace::theta(qh, kh, st.theta_shape[0], st.theta_rate[0]);
            for (int ka = 0; ka < qa.count; ++ka) {
                const double ta = Workspace::theta(qa, ka, st.theta_shape[1], st.theta_rate[1]);
                const double a = base.home[c0] * th;
                const double b = base.away[c0] * ta;
                const double q = a + b;
                if (!(q > 0.0)) continue;
                const double wt = qh.weight[at(kh)] * qa.weight[at(ka)] * -std::expm1(-q * ph.now);
                home += wt * a / q;
                away += wt * b / q;
            }
        }
        out.next_goal_home = home;
        out.next_goal_away = away;
        out.next_goal_none = 1.0 - home - away;
    }

    if (independent) {
        // Closed forms: each side's goals to come are Poisson or negative binomial.
        const double mean_h = base.home[1] * ph.now;
        const double mean_a = base.away[1] * ph.now;
        goals_pmf(mean_h, st.theta_shape[0], st.theta_rate[0], w.pmf[0], w.cdf[0]);
        goals_pmf(mean_a, st.theta_shape[1], st.theta_rate[1], w.pmf[1], w.cdf[1]);
        const Pmf& ph_ = w.pmf[0];
        const Pmf& pa_ = w.pmf[1];
        const int gh = st.goals[0], ga = st.goals[1];
        for (int i = 0; i < kGrid; ++i) {
            for (int j = 0; j < kGrid; ++j) out.goals_added[at(i)][at(j)] = ph_[at(i)] * pa_[at(j)];
        }
        out.tail_mass = 1.0 - w.cdf[0][kGrid - 1] * w.cdf[1][kGrid - 1];
        const SignSplit match = sign_split(ph_, pa_, w.cdf[1], gh - ga);
        out.p_home = match.home;
        out.p_draw = match.level;
        out.p_away = match.away;
        auto side_mean = [](double mean, double shape, double rate) {
            return std::isinf(shape) ? mean : mean * shape / rate;
        };
        out.expected_home_goals = gh + side_mean(mean_h, st.theta_shape[0], st.theta_rate[0]);
        out.expected_away_goals = ga + side_mean(mean_a, st.theta_shape[1], st.theta_rate[1]);
        for (int k = 0; k < kTotalsLines; ++k) {
            const int room = k - gh - ga;  // goals to come that keep the total at or under the line
            double under = 0.0;
            for (int i = 0; i <= room; ++i) under += ph_[at(i)] * cdf_at(w.cdf[1], room - i);
            out.p_over[at(k)] = 1.0 - under;
        }
        out.p_both_score = (gh >= 1 ? 1.0 : 1.0 - ph_[0]) * (ga >= 1 ? 1.0 : 1.0 - pa_[0]);

        if (out.has_advance) {
            const SignSplit tie = sign_split(ph_, pa_, w.cdf[1], tie0);
            double adv_home = tie.home;
            double adv_away = tie.away;
            if (ph.extra_time > 0.0) {
                // Level at full time: extra time with the strength posterior updated by the
                // regulation goals that made it level (Gamma(α + i, β + mean) per side).
                const double et_h = base.home[1] * ph.extra_time;
                const double et_a = base.away[1] * ph.extra_time;
                for (int i = std::max(0, -tie0); i < kPmfLength; ++i) {
                    const int j = i + tie0;
                    if (j >= kPmfLength) break;
                    const double level_mass = ph_[at(i)] * pa_[at(j)];
                    if (level_mass < 1e-300) continue;
                    goals_pmf(et_h, st.theta_shape[0] + i, st.theta_rate[0] + mean_h, w.et_pmf[0], w.et_cdf[0]);
                    goals_pmf(et_a, st.theta_shape[1] + j, st.theta_rate[1] + mean_a, w.et_pmf[1], w.et_cdf[1]);
                    const SignSplit et = sign_split(w.et_pmf[0], w.et_pmf[1], w.et_cdf[1], 0);
                    adv_home += level_mass * (et.home + et.level * shootout_home);
                    adv_away += level_mass * (et.away + et.level * (1.0 - shootout_home));
                }
            } else {
                adv_home += tie.level * shootout_home;
                adv_away += tie.level * (1.0 - shootout_home);
            }
            out.p_advance_home = adv_home;
            out.p_advance_away = adv_away;
        }
        return;
    }

    // Score-state effects: solve the chain per pair of strength nodes and mix.
    ScoreGrid& mix = w.mix;
    mix = ScoreGrid{};
    double adv_home = 0.0, adv_away = 0.0;
    for (int kh = 0; kh < qh.count; ++kh) {
        const double th = Workspace::theta(qh, kh, st.theta_shape[0], st.theta_rate[0]);
        for (int ka = 0; ka < qa.count; ++ka) {
            const double ta = Workspace::theta(qa, ka, st.theta_shape[1], st.theta_rate[1]);
            const double wt = qh.weight[at(kh)] * qa.weight[at(ka)];
            ClassRates r;
            for (std::size_t c = 0; c < kDiffClasses; ++c) {
                r.home[c] = base.home[c] * th;
                r.away[c] = base.away[c] * ta;
            }
            ScoreGrid& g = w.node_grid;
            w.chain.solve(r, tie0, ph.now, g);
            for (std::size_t i = 0; i < kGrid; ++i) {
                for (std::size_t j = 0; j < kGrid; ++j) mix.cell[i][j] += wt * g.cell[i][j];
                mix.home_overflow[i] += wt * g.home_overflow[i];
                mix.away_overflow[i] += wt * g.away_overflow[i];
            }
            if (!out.has_advance) continue;
            SignSplit tie;
            auto count = [&tie](int d, double v) {
                if (d > 0) tie.home += v;
                else if (d < 0) tie.away += v;
                else tie.level += v;
            };
            for (int i = 0; i < kGrid; ++i) {
                for (int j = 0; j < kGrid; ++j) count(tie0 + i - j, g.cell[at(i)][at(j)]);
                count(tie0 + kGrid - i, g.home_overflow[at(i)]);
                count(tie0 + i - kGrid, g.away_overflow[at(i)]);
            }
            double level_home = shootout_home;
            double level_away = 1.0 - shootout_home;
            if (ph.extra_time > 0.0) {
                const DifferenceOutcome et = solve_difference(r, 0, ph.extra_time);
                level_home = et.home_ahead + et.level * shootout_home;
                level_away = et.away_ahead + et.level * (1.0 - shootout_home);
            }
            adv_home += wt * (tie.home + tie.level * level_home);
            adv_away += wt * (tie.away + tie.level * level_away);
        }
    }
    summarise(mix, st, out);
    if (out.has_advance) {
        out.p_advance_home = adv_home;
        out.p_advance_away = adv_away;
    }
}

}  // namespace liveprob
