#include "liveprob/fit/dixon_coles.hpp"
#include "liveprob/fit/prices_to_prior.hpp"
#include "log_factorial.hpp"
#include "rating_newton.hpp"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <numeric>
#include <stdexcept>
#include <unordered_map>

namespace liveprob::fit {

double dixon_coles_tau(int x, int y, double lambda, double nu, double rho) noexcept {
    if (x == 0 && y == 0) return 1.0 - lambda * nu * rho;
    if (x == 0 && y == 1) return 1.0 + lambda * rho;
    if (x == 1 && y == 0) return 1.0 + nu * rho;
    if (x == 1 && y == 1) return 1.0 - rho;
    return 1.0;
}

const TeamRating* Ratings::find(std::string_view name) const noexcept {
    auto it = std::lower_bound(teams.begin(), teams.end(), name,
                               [](const TeamRating& t, std::string_view n) { return t.name < n; });
    return (it != teams.end() && it->name == name) ? &*it : nullptr;
}

ExpectedGoals expected_goals(const Ratings& r, const TeamRating& home, const TeamRating& away,
                             bool neutral) noexcept {
    const double h = neutral ? 0.0 : r.home_advantage;
    return {std::exp(r.intercept + h + home.attack - away.defence),
            std::exp(r.intercept + away.attack - home.defence)};
}

OutcomeProbabilities outcome_probabilities(double lh, double la, double rho) {
    const PreMatchProbabilities p = independent_poisson(lh, la, std::nullopt);
    // The τ corrections move mass between the four low scores only.
    const double p0h = std::exp(-lh), p0a = std::exp(-la);
    const double p00 = p0h * p0a, p10 = lh * p0h * p0a, p01 = p0h * la * p0a, p11 = lh * la * p00;
    OutcomeProbabilities out{p.home, p.draw, p.away};
    out.draw += p00 * (-lh * la * rho) + p11 * (-rho);
    out.home += p10 * (la * rho);
    out.away += p01 * (lh * rho);
    return out;
}

namespace {

using detail::RatingGame;
using detail::RatingNewtonSystem;
using Theta = detail::RatingParams;

std::string shrink_warning(std::string_view name, double weighted, double minimum) {
    char buf[160];
    std::snprintf(buf, sizeof buf,
                  "only %.1f weighted matches (minimum %.1f); rating shrunk toward the average",
                  weighted, minimum);
    return "team '" + std::string(name) + "': " + buf;
}

double largest(const Theta& s) {
    return std::max({s.attack.cwiseAbs().maxCoeff(), s.defence.cwiseAbs().maxCoeff(),
                     std::abs(s.mu), std::abs(s.home)});
}

Theta moved(const Theta& t, const Theta& step, double f) {
    Theta out = t;
    out.attack += f * step.attack;
    out.defence += f * step.defence;
    out.mu += f * step.mu;
    out.home += f * step.home;
    return out;
}

bool finite_ratings(const Ratings& r) {
    if (!std::isfinite(r.intercept) || !std::isfinite(r.home_advantage) || !std::isfinite(r.rho))
        return false;
    return std::all_of(r.teams.begin(), r.teams.end(), [](const TeamRating& t) {
        return std::isfinite(t.attack) && std::isfinite(t.defence);
    });
}

struct NewtonOutcome {
    int iterations = 0;
    bool converged = false;
    bool singular = false;  // the system could not be factored (should not happen; reported)
};

// Newton iterations with step halving at fixed ρ.
NewtonOutcome newton(RatingNewtonSystem& solver, Theta& t, double rho, const RatingsFitOptions& o) {
    NewtonOutcome out;
    double objective = solver.log_likelihood(t, rho, true);
    for (out.iterations = 1; out.iterations <= o.max_iterations; ++out.iterations) {
        if (!solver.assemble(t, rho)) {
            out.singular = true;
            return out;
        }
        const Theta step = solver.newton_step();
        double f = 1.0;
        Theta next = moved(t, step, f);
        double next_objective = solver.log_likelihood(next, rho, true);
        while (!(next_objective >= objective - 1e-12 * std::abs(objective)) && f > 1e-6) {
            f *= 0.5;
            next = moved(t, step, f);
            next_objective = solver.log_likelihood(next, rho, true);
        }
        t = next;
        objective = next_objective;
        if (largest(step) * f < o.tolerance) {
            out.converged = true;
            return out;
        }
    }
    out.iterations = o.max_iterations;
    return out;
}

// Groups of teams linked by the matches (directly or through common opponents), by union-find.
// Ratings of two groups that never met are not comparable: the likelihood is flat along a
// shift of one group's attack and defence together.
std::vector<int> team_groups(const std::vector<RatingGame>& games, int teams) {
    std::vector<int> parent(static_cast<std::size_t>(teams));
    std::iota(parent.begin(), parent.end(), 0);
    auto root = [&](int i) {
        while (parent[static_cast<std::size_t>(i)] != i) {
            parent[static_cast<std::size_t>(i)] =
                parent[static_cast<std::size_t>(parent[static_cast<std::size_t>(i)])];
            i = parent[static_cast<std::size_t>(i)];
        }
        return i;
    };
    for (const auto& g : games) parent[static_cast<std::size_t>(root(g.home))] = root(g.away);
    std::vector<int> group(static_cast<std::size_t>(teams));
    for (int i = 0; i < teams; ++i) group[static_cast<std::size_t>(i)] = root(i);
    return group;
}

// Teams outside the largest group get this much prior precision on attack and defence: enough
// to place each separate group (its attack and defence balanced around the average), far too
// little to move a rating the matches determine.
constexpr double kSeparateGroupPrecision = 1e-6;

std::string separate_groups_warning(int groups, int teams_outside) {
    return "the matches split into " + std::to_string(groups) +
           " groups of teams that never met, directly or through common opponents; ratings compare "
           "only "
           "within a group (the " +
           std::to_string(teams_outside) +
           " teams outside the largest group are centred on the average)";
}

}  // namespace

Ratings fit_ratings(std::span<const MatchResult> matches, const RatingsFitOptions& o) {
    std::optional<int> last_day;
    for (const auto& m : matches)
        if (!o.as_of_day || m.day < *o.as_of_day)
            last_day = std::max(last_day.value_or(m.day), m.day);
    if (!last_day) throw std::invalid_argument("no match to fit (all on or after the as-of date?)");
    const int reference_day = o.as_of_day.value_or(*last_day + 1);

    std::unordered_map<std::string_view, int> index;
    std::vector<std::string_view> names;
    std::vector<RatingGame> games;
    std::vector<int> counts;
    std::vector<double> weights;
    double goals = 0.0, weight_total = 0.0;
    auto team = [&](const std::string& name) {
        auto [it, inserted] = index.try_emplace(name, static_cast<int>(names.size()));
        if (inserted) {
            names.push_back(name);
            counts.push_back(0);
            weights.push_back(0.0);
        }
        return it->second;
    };
    for (const auto& m : matches) {
        if (o.as_of_day && m.day >= *o.as_of_day) continue;  // never the future
        if (m.home_goals < 0 || m.away_goals < 0 || m.home == m.away) continue;
        const double decay = std::exp(-o.xi * (reference_day - m.day));
        if (decay < o.min_weight) continue;
        const double w = decay * (m.friendly ? o.friendly_weight : 1.0);
        if (w <= 0.0) continue;
        const int h = team(m.home), a = team(m.away);
        games.push_back({h, a, m.home_goals, m.away_goals, m.neutral, w,
                         log_factorial(m.home_goals) + log_factorial(m.away_goals)});
        for (int i : {h, a}) {
            counts[static_cast<std::size_t>(i)] += 1;
            weights[static_cast<std::size_t>(i)] += w;
        }
        goals += w * (m.home_goals + m.away_goals);
        weight_total += 2.0 * w;
    }
    if (games.empty()) throw std::invalid_argument("no match to fit inside the decay window");
    const int n = static_cast<int>(names.size());

    Ratings r;
    r.xi = o.xi;
    r.as_of_day = o.as_of_day;
    r.diagnostics.matches = static_cast<int>(games.size());
    Eigen::VectorXd precision = Eigen::VectorXd::Zero(n);
    for (int i = 0; i < n; ++i) {
        const auto u = static_cast<std::size_t>(i);
        if (weights[u] < o.min_matches) {
            precision[i] = o.shrink_precision;
            r.diagnostics.warnings.push_back(shrink_warning(names[u], weights[u], o.min_matches));
        }
    }

    Theta cold;
    cold.attack = Eigen::VectorXd::Zero(n);
    cold.defence = Eigen::VectorXd::Zero(n);
    cold.mu = std::log(std::max(goals / weight_total, 1e-3));
    Theta t = cold;
    double rho = 0.0;
    const bool warm = o.start != nullptr && finite_ratings(*o.start);
    if (warm) {
        t.mu = o.start->intercept;
        t.home = o.start->home_advantage;
        rho = o.fit_rho ? o.start->rho : 0.0;
        for (int i = 0; i < n; ++i)
            if (const TeamRating* s = o.start->find(names[static_cast<std::size_t>(i)])) {
                t.attack[i] = s->attack;
                t.defence[i] = s->defence;
            }
        // Restore the constraint on the warm start (new teams join at 0).
        const double ma = t.attack.mean(), md = t.defence.mean();
        t.attack.array() -= ma;
        t.defence.array() -= md;
        t.mu += ma - md;
    }

    const std::vector<int> group = team_groups(games, n);
    std::unordered_map<int, int> group_size;
    for (int g : group) ++group_size[g];
    if (group_size.size() > 1) {
        const auto largest_group =
            std::max_element(group_size.begin(), group_size.end(),
                             [](const auto& x, const auto& y) { return x.second < y.second; });
        for (int i = 0; i < n; ++i)
            if (group[static_cast<std::size_t>(i)] != largest_group->first)
                precision[i] += kSeparateGroupPrecision;
        r.diagnostics.warnings.push_back(separate_groups_warning(
            static_cast<int>(group_size.size()), n - largest_group->second));
    }

    RatingNewtonSystem solver(std::move(games), n, precision, o.level_precision);
    NewtonOutcome outcome = newton(solver, t, rho, o);
    int iterations = outcome.iterations;
    if (warm && !outcome.converged) {  // a warm start is only a hint: start again from cold
        t = cold;
        rho = 0.0;
        outcome = newton(solver, t, rho, o);
        iterations += outcome.iterations;
    }
    double rho_curvature = 0.0;
    if (o.fit_rho) {
        for (int round = 0; round < 50 && !outcome.singular; ++round) {
            const double next = solver.best_rho(t, rho_curvature);
            const bool settled = std::abs(next - rho) < 1e-10;
            rho = next;
            outcome = newton(solver, t, rho, o);
            iterations += outcome.iterations;
            if (settled) break;
        }
        solver.best_rho(t, rho_curvature);
    }

    r.intercept = t.mu;
    r.home_advantage = t.home;
    r.rho = rho;
    r.diagnostics.iterations = iterations;
    r.diagnostics.converged = outcome.converged;
    if (outcome.singular)
        r.diagnostics.warnings.push_back(
            "the Newton system became singular: the fit stopped early");
    else if (!outcome.converged)
        r.diagnostics.warnings.push_back("Newton did not converge in " +
                                         std::to_string(o.max_iterations) + " iterations");
    r.diagnostics.log_likelihood = solver.log_likelihood(t, rho, false);

    Eigen::VectorXd attack_se = Eigen::VectorXd::Zero(n), defence_se = Eigen::VectorXd::Zero(n);
    if (o.standard_errors && solver.assemble(t, rho)) {
        solver.standard_errors(attack_se, defence_se, r.intercept_se, r.home_advantage_se);
        if (o.fit_rho && rho_curvature < 0.0) r.rho_se = std::sqrt(-1.0 / rho_curvature);
    }
    r.teams.reserve(static_cast<std::size_t>(n));
    for (int i = 0; i < n; ++i) {
        const auto u = static_cast<std::size_t>(i);
        r.teams.push_back({std::string(names[u]), t.attack[i], t.defence[i], attack_se[i],
                           defence_se[i], counts[u], weights[u], weights[u] < o.min_matches});
    }
    std::sort(r.teams.begin(), r.teams.end(),
              [](const auto& a, const auto& b) { return a.name < b.name; });
    return r;
}

}  // namespace liveprob::fit
