// The pricing model. Two paths give the same answer where both apply:
//  - independent: no score-state effect (red cards only scale the rates, which stay constant
//    until the next event), so each side's goals to come are Poisson (θ known) or negative
//    binomial (θ Gamma-distributed), in closed form;
//  - mixture: score-state effects couple the sides, so the score chain is solved and mixed
//    over the strengths. With θ_H ~ Gamma(α_H, β_H) and θ_A ~ Gamma(α_A, β_A) write
//    θ_X = φ_X / β_X with φ_X ~ Gamma(α_X, 1): then s = φ_H + φ_A ~ Gamma(α_H + α_A, 1) and
//    ρ = φ_H / s ~ Beta(α_H, α_A) are independent, and the generator is s · Q(ρ). The factor
//    s is integrated exactly (the chain's jump count becomes negative binomial,
//    jump_counts.hpp), and only ρ is left to Gauss–Jacobi quadrature: one chain solve per
//    node instead of one per pair of nodes. With a known strength (κ = ∞) on either side the
//    chain is solved per Gauss–Laguerre node of the other.
#include "liveprob/core/pricing.hpp"

#include <algorithm>
#include <cmath>
#include <limits>
#include <memory>
#include <span>
#include <stdexcept>
#include <utility>

#include "liveprob/core/intensity.hpp"
#include "liveprob/core/jump_counts.hpp"
#include "liveprob/core/quadrature.hpp"
#include "liveprob/core/score_chain.hpp"
#include "liveprob/core/settle_rounding.hpp"
#include "liveprob/core/shootout.hpp"
#include "liveprob/core/timing.hpp"
#include "liveprob/core/validate.hpp"

namespace liveprob::core {
namespace {

// Longest goal-count distribution kept for the closed forms; the mass beyond it is far below
// 1e-15 for prior means up to kMaxPriorGoals.
constexpr int kPmfLength = 96;

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
        if (p == 0.0) break;             // the rest of the pmf was dropped as negligible
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
    ph.in_shootout =
        st.status == MatchStatus::shootout || p == Period::shootout || p == Period::finished;
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
    // One pass gathers the mass by goals added per side (rows, columns), by difference and by
    // total; every output is a sum over one of those.
    constexpr int kSide = kGrid + 1;  // goals added 0 .. kGrid, kGrid being an overflow bucket
    std::array<double, kSide> by_home{}, by_away{};
    std::array<double, 2 * kSide - 1> by_diff{}, by_total{};  // i - j + kGrid, i + j
    auto add = [&](int i, int j, double v) {
        by_home[at(i)] += v;
        by_away[at(j)] += v;
        by_diff[at(i - j + kGrid)] += v;
        by_total[at(i + j)] += v;
    };
    for (int i = 0; i < kGrid; ++i) {
        for (int j = 0; j < kGrid; ++j) add(i, j, g.cell[at(i)][at(j)]);
        add(kGrid, i, g.home_overflow[at(i)]);
        add(i, kGrid, g.away_overflow[at(i)]);
    }
    const int gh = st.goals[0];
    const int ga = st.goals[1];
    double total = 0.0;
    out.p_home = out.p_draw = out.p_away = 0.0;
    for (int d = -kGrid; d <= kGrid; ++d) {
        const double v = by_diff[at(d + kGrid)];
        const int final_diff = gh - ga + d;
        (final_diff > 0 ? out.p_home : final_diff < 0 ? out.p_away : out.p_draw) += v;
        total += v;
    }
    out.p_over.fill(0.0);
    for (int t = 0; t < 2 * kSide - 1; ++t) {
        for (int k = 0; k < kTotalsLines; ++k) {
            if (gh + ga + t > totals_line(k)) out.p_over[at(k)] += by_total[at(t)];
        }
    }
    out.expected_home_goals = out.expected_away_goals = 0.0;
    for (int k = 0; k < kSide; ++k) {
        out.expected_home_goals += by_home[at(k)] * (gh + k);
        out.expected_away_goals += by_away[at(k)] * (ga + k);
    }
    // Both score: everything but "home ends on 0" and "away ends on 0" (inclusion-exclusion).
    out.p_both_score = total - (gh == 0 ? by_home[0] : 0.0) - (ga == 0 ? by_away[0] : 0.0) +
                       (gh == 0 && ga == 0 ? g.cell[0][0] : 0.0);
    out.goals_added = g.cell;
    out.tail_mass = g.overflow_total();
}

constexpr double kInf = std::numeric_limits<double>::infinity();

// The strength mixture as weighted nodes. A node multiplies the home and away rates by its
// factors; `jump_shape` is the shape of the chain's jump count (infinite: Poisson, the
// strengths fixed at the node; finite: the common Gamma factor s integrated out).
class MixtureNodes {
public:
    struct Node {
        double weight = 1.0;
        double home_factor = 1.0;
        double away_factor = 1.0;
        double jump_shape = kInf;
    };
    // ρ ~ Beta(α_H, α_A) by `rule`: factors ρ/β_H and (1 − ρ)/β_A per unit of s.
    static MixtureNodes ratio(const QuadratureRule& rule, const PricingState& st) {
        MixtureNodes m;
        m.ratio_ = &rule;
        m.st_ = &st;
        return m;
    }
    // θ_H and θ_A on their own Gauss–Laguerre rules (one node θ = 1 for a known side).
    static MixtureNodes product(const QuadratureRule& home, const QuadratureRule& away,
                                const PricingState& st) {
        MixtureNodes m;
        m.home_ = &home;
        m.away_ = &away;
        m.st_ = &st;
        return m;
    }
    int count() const noexcept { return ratio_ ? ratio_->count : home_->count * away_->count; }
    Node node(int k) const noexcept {
        const PricingState& st = *st_;
        if (ratio_) {
            const double rho = ratio_->node[at(k)];
            return {ratio_->weight[at(k)], rho / st.theta_rate[0], (1.0 - rho) / st.theta_rate[1],
                    st.theta_shape[0] + st.theta_shape[1]};
        }
        const int kh = k / away_->count;
        const int ka = k % away_->count;
        return {home_->weight[at(kh)] * away_->weight[at(ka)], theta(*home_, kh, 0),
                theta(*away_, ka, 1), kInf};
    }

private:
    double theta(const QuadratureRule& q, int k, int side) const noexcept {
        const double shape = st_->theta_shape[at(side)];
        return std::isinf(shape) ? 1.0 : q.node[at(k)] / st_->theta_rate[at(side)];
    }
    const QuadratureRule* ratio_ = nullptr;
    const QuadratureRule* home_ = nullptr;
    const QuadratureRule* away_ = nullptr;
    const PricingState* st_ = nullptr;
};

// Sign of the tie (tie0 + i - j) over a distribution of goals added; overflow buckets count
// at the score where they left the grid.
SignSplit tie_split(const ScoreGrid& g, int tie0) {
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
    return tie;
}

struct AdvanceSplit {
    double home = 0.0;
    double away = 0.0;
};

// P(advance) contributed by a tie level at the end of regulation, given the score chain's
// level trace (entry n: the node's weight × P(n regulation jumps) × level mass after them).
// Extra time runs on the difference chain from level with the same rates; its jump count,
// given n regulation jumps, is `regulation.after(n, et_scale)` (for a Gamma factor, its
// posterior after the regulation jumps: the strengths persist into extra time). A tie still
// level goes to the shoot-out.
// Scratch for extra_time_after_level, by extra-time jump count k.
struct ExtraTimeScratch {
    std::array<double, kMaxJumps> weights{};
    // P(home advances | k jumps from level), shoot-out included
    std::array<double, kMaxJumps> value{};
    std::array<double, kMaxJumps> counts{};
    // The extra-time weights for a few consecutive regulation jump counts at once.
    static constexpr std::size_t kBlock = 4;
    std::array<std::array<double, kMaxJumps>, kBlock> block{};
};

AdvanceSplit extra_time_after_level(std::span<const double> level_by_jumps, const ClassRates& rates,
                                    const JumpCounts& regulation, double et_scale,
                                    double shootout_home, ExtraTimeScratch& x) {
    AdvanceSplit out;
    if (level_by_jumps.empty()) return out;
    // The count after the most regulation jumps is the widest: its length bounds the extra-time
    // jumps that matter for every n (the others' tails are lighter).
    const int most = static_cast<int>(level_by_jumps.size()) - 1;
    const std::size_t span = jump_weights(regulation.after(most, et_scale), 1.0, x.weights);
    difference_values(rates, 0, shootout_home, std::span(x.value).first(span));
    // Every level tie is settled one way or the other: P(away advances) = mass - P(home).
    auto add = [&](double level_mass, const double* w, std::size_t kn) {
        double home = 0.0, total = 0.0;
        for (std::size_t k = 0; k < kn; ++k) {
            home += w[k] * x.value[k];
            total += w[k];
        }
        out.home += level_mass * home;
        out.away += level_mass * (total - home);
    };
    if (regulation.is_poisson()) {  // extra time's count does not depend on regulation's
        double level_mass = 0.0;
        for (double v : level_by_jumps) level_mass += v;
        add(level_mass, x.weights.data(),
            jump_weights(regulation.after(0, et_scale), 1.0, x.weights));
        return out;
    }
    // Negative binomial: given n regulation jumps the extra-time count is NB(A + n, c2):
    // P_n(k) = Γ(A+n+k) / (Γ(A+n) k!) q^k (1-q)^(A+n), q = c2 / (1 + c2). Kept for all k at
    // once and moved from n to n + 1 by the factor (A+n+k) / (A+n) · (1-q): vector arithmetic,
    // no transcendental function per term.
    const JumpCounts first = regulation.after(0, et_scale);
    const double q = first.scale / (1.0 + first.scale);
    double* p = x.weights.data();
    p[0] = std::exp(-first.shape * std::log1p(first.scale));
    if (p[0] < 1e-280) {  // far outside the model's range: the general (log-space) routine
        for (std::size_t n = 0; n < level_by_jumps.size(); ++n) {
            const std::size_t kn =
                jump_weights(regulation.after(static_cast<int>(n), et_scale), 1.0, x.weights);
            add(level_by_jumps[n], x.weights.data(), std::min(kn, span));
        }
        return out;
    }
    double* ks = x.counts.data();  // k as a double, so that the loop below vectorizes
    for (std::size_t k = 0; k < span; ++k) ks[k] = static_cast<double>(k);
    for (std::size_t k = 0; k + 1 < span; ++k)
        p[k + 1] = p[k] * (first.shape + ks[k]) / (ks[k] + 1.0) * q;
    // P_n from P_{n-1}.
    auto advance = [&](const double* from, double* to, std::size_t n) {
        const double shape = first.shape + static_cast<double>(n - 1);  // A + n - 1
        const double base = (1.0 - q) / shape;
        for (std::size_t k = 0; k < span; ++k) to[k] = from[k] * ((shape + ks[k]) * base);
    };
    add(level_by_jumps[0], p, span);
    // Each n's sums over k run in order (their rounding is part of the published figures), so
    // four consecutive n are summed side by side: independent chains the processor overlaps
    // instead of one chain waiting on each addition.
    constexpr std::size_t kBlock = ExtraTimeScratch::kBlock;
    const std::size_t levels = level_by_jumps.size();
    const double* prev = p;
    std::size_t n = 1;
    for (; n + kBlock <= levels; n += kBlock) {
        std::array<double*, kBlock> rows{};
        for (std::size_t b = 0; b < kBlock; ++b) {
            rows[b] = x.block[b].data();
            advance(b == 0 ? prev : rows[b - 1], rows[b], n + b);
        }
        std::array<double, kBlock> home{}, total{};
        for (std::size_t k = 0; k < span; ++k) {
            const double value = x.value[k];
            for (std::size_t b = 0; b < kBlock; ++b) {
                home[b] += rows[b][k] * value;
                total[b] += rows[b][k];
            }
        }
        for (std::size_t b = 0; b < kBlock; ++b) {
            out.home += level_by_jumps[n + b] * home[b];
            out.away += level_by_jumps[n + b] * (total[b] - home[b]);
        }
        prev = rows[kBlock - 1];
    }
    for (std::size_t b = 0; n < levels; ++n, ++b) {  // the last few, one at a time
        double* row = x.block[b].data();
        advance(prev, row, n);
        add(level_by_jumps[n], row, span);
        prev = row;
    }
    return out;
}

// Buffers a pricing call works in (a few hundred kilobytes, mostly the chains' jump-count
// tables). One set per thread, shared by every model the thread prices with: a service holding
// thousands of matches keeps one set, not one per match. Allocated on a thread's first call.
struct PricingScratch {
    ScoreChain chain;
    ScoreGrid mix;
    std::array<QuadratureRule, 2> quad{};
    std::array<std::pair<double, int>, 2> quad_key{
        std::pair{std::numeric_limits<double>::quiet_NaN(), 0},
        std::pair{std::numeric_limits<double>::quiet_NaN(), 0}};
    std::array<Pmf, 2> pmf{}, cdf{};
    std::array<Pmf, 2> et_pmf{}, et_cdf{};
    ExtraTimeScratch extra_time;

    // Strength nodes θ_k and weights of one side (θ = 1 when the shape is infinite): the
    // Gauss–Laguerre nodes depend on the shape only (the rate rescales them), so the last
    // rule per side is kept.
    const QuadratureRule& nodes(int side, double shape, int count) {
        QuadratureRule& q = quad[at(side)];
        if (std::isinf(shape)) {
            q.count = 1;
            q.node[0] = 1.0;
            q.weight[0] = 1.0;
            quad_key[at(side)] = {shape, 1};
        } else if (!(quad_key[at(side)] == std::pair{shape, count})) {
            gamma_quadrature(shape, count, q);
            quad_key[at(side)] = {shape, count};
        }
        return q;
    }
};

PricingScratch& thread_scratch() {
    thread_local std::unique_ptr<PricingScratch> scratch;
    if (!scratch) scratch = std::make_unique<PricingScratch>();
    return *scratch;
}

}  // namespace

void settle_rounding(Outputs& out) noexcept {
    auto settle = [](double& p) {
        if (p < 0.0 && p > -1e-12) p = 0.0;
    };
    for (double* p : {&out.p_home, &out.p_draw, &out.p_away, &out.p_advance_home,
                      &out.p_advance_away, &out.next_goal_home, &out.next_goal_away,
                      &out.next_goal_none, &out.p_both_score, &out.tail_mass}) {
        settle(*p);
    }
    for (double& p : out.p_over) settle(p);
    for (auto& row : out.goals_added) {
        for (double& p : row) settle(p);
    }
}

// What one model keeps between calls: its parameters and the strength-ratio rule, which
// depends on the two shapes only (they change with goals and xG, not with the clock).
struct PricingModel::Workspace {
    ModelParams params;
    double shootout_before_toss = 0.5;
    QuadratureRule ratio_rule{};  // Beta(α_H, α_A) nodes for the strength ratio ρ
    std::array<double, 2> ratio_shapes{std::numeric_limits<double>::quiet_NaN(),
                                       std::numeric_limits<double>::quiet_NaN()};

    const QuadratureRule& ratio_nodes(double home_shape, double away_shape) {
        if (!(ratio_shapes[0] == home_shape && ratio_shapes[1] == away_shape)) {
            beta_quadrature(home_shape, away_shape, params.quadrature_nodes, ratio_rule);
            ratio_shapes = {home_shape, away_shape};
        }
        return ratio_rule;
    }
};

PricingModel::PricingModel(const ModelParams& params) : ws_(std::make_unique<Workspace>()) {
    // The one set of limits every reader of parameters applies (validate.hpp).
    if (const auto problem = validate_params(params))
        throw std::invalid_argument("model parameters: " + problem->describe());
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
    price_unsettled(st, out);
    settle_rounding(out);
}

void PricingModel::price_unsettled(const PricingState& st, Outputs& out) {
    Workspace& model = *ws_;
    PricingScratch& w = thread_scratch();
    const ModelParams& prm = model.params;
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
        shootout_home = st.status == MatchStatus::shootout
                            ? shootout_home_win(prm.shootout, st.shootout)
                            : model.shootout_before_toss;
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
        base.home[at(c)] =
            st.prior.home_goals * state_multiplier(prm, Side::home, d, st.reds[0], st.reds[1]);
        base.away[at(c)] =
            st.prior.away_goals * state_multiplier(prm, Side::away, -d, st.reds[1], st.reds[0]);
    }
    const bool independent = base.home[0] == base.home[1] && base.home[1] == base.home[2] &&
                             base.away[0] == base.away[1] && base.away[1] == base.away[2];

    // Strengths: both Gamma-distributed (the usual case: the ratio rule), or at least one
    // known (κ = ∞: a product of Gauss–Laguerre rules, one node for a known side).
    const bool ratio_mixture = !std::isinf(st.theta_shape[0]) && !std::isinf(st.theta_shape[1]);
    const MixtureNodes nodes =
        ratio_mixture
            ? MixtureNodes::ratio(model.ratio_nodes(st.theta_shape[0], st.theta_shape[1]), st)
            : MixtureNodes::product(w.nodes(0, st.theta_shape[0], prm.quadrature_nodes),
                                    w.nodes(1, st.theta_shape[1], prm.quadrature_nodes), st);

    // Next goal before the end of the current phase: the state holds until then, so per node
    // it is the first of two exponential clocks (with the factor s integrated out in closed
    // form for the ratio rule: P(some goal) = 1 - (1 + qτ)^-(α_H + α_A)).
    {
        const auto c0 = at(diff_class(tie0));
        double home = 0.0, away = 0.0;
        for (int k = 0; k < nodes.count(); ++k) {
            const MixtureNodes::Node nd = nodes.node(k);
            const double a = base.home[c0] * nd.home_factor;
            const double b = base.away[c0] * nd.away_factor;
            const double q = a + b;
            if (!(q > 0.0)) continue;
            const double any = nd.jump_shape == kInf
                                   ? -std::expm1(-q * ph.now)
                                   : -std::expm1(-nd.jump_shape * std::log1p(q * ph.now));
            home += nd.weight * any * a / q;
            away += nd.weight * any * b / q;
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
                    goals_pmf(et_h, st.theta_shape[0] + i, st.theta_rate[0] + mean_h, w.et_pmf[0],
                              w.et_cdf[0]);
                    goals_pmf(et_a, st.theta_shape[1] + j, st.theta_rate[1] + mean_a, w.et_pmf[1],
                              w.et_cdf[1]);
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

    // Score-state effects: solve the chain per strength node and mix.
    ScoreGrid& mix = w.mix;
    mix = ScoreGrid{};
    const bool extra_time_follows = out.has_advance && ph.extra_time > 0.0;
    const int level = 0;                        // the tie is level where tie0 + i - j == 0
    double level_home = 0.0, level_away = 0.0;  // a level tie's share of P(advance)
    for (int k = 0; k < nodes.count(); ++k) {
        const MixtureNodes::Node nd = nodes.node(k);
        ClassRates r;
        for (std::size_t c = 0; c < kDiffClasses; ++c) {
            r.home[c] = base.home[c] * nd.home_factor;
            r.away[c] = base.away[c] * nd.away_factor;
        }
        const double lam = r.max_total();
        const JumpCounts counts{nd.jump_shape, lam * ph.now};
        w.chain.add(r, tie0, counts, nd.weight, mix, extra_time_follows ? &level : nullptr);
        if (!extra_time_follows) continue;
        // Level at full time: extra time from level, its jump count conditioned on the
        // regulation jumps (the strengths persist), then the shoot-out.
        const AdvanceSplit et = extra_time_after_level(
            w.chain.level_trace(), r, counts, lam * ph.extra_time, shootout_home, w.extra_time);
        level_home += et.home;
        level_away += et.away;
    }
    summarise(mix, st, out);
    if (out.has_advance) {
        const SignSplit tie = tie_split(mix, tie0);
        out.p_advance_home =
            tie.home + (extra_time_follows ? level_home : tie.level * shootout_home);
        out.p_advance_away =
            tie.away + (extra_time_follows ? level_away : tie.level * (1.0 - shootout_home));
    }
}

}  // namespace liveprob::core
