#include "liveprob/engine/fit/dixon_coles.hpp"
#include "liveprob/engine/fit/prices_to_prior.hpp"

#include <Eigen/Dense>

#include <algorithm>
#include <cstdio>
#include <cmath>
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

std::string shrink_warning(std::string_view name, double weighted, double minimum) {
    char buf[160];
    std::snprintf(buf, sizeof buf, "only %.1f weighted matches (minimum %.1f); rating shrunk toward the average",
                  weighted, minimum);
    return "team '" + std::string(name) + "': " + buf;
}

struct Game {
    int home, away, x, y;
    bool neutral;
    double w;
};

// d log τ / d η_home, d η_away, d ρ for one game (zero outside the four low scores).
struct TauSlopes {
    double home = 0.0, away = 0.0, rho = 0.0;
};

TauSlopes tau_slopes(const Game& g, double lambda, double nu, double rho) {
    const double t = dixon_coles_tau(g.x, g.y, lambda, nu, rho);
    if (g.x == 0 && g.y == 0) return {-lambda * nu * rho / t, -lambda * nu * rho / t, -lambda * nu / t};
    if (g.x == 0 && g.y == 1) return {lambda * rho / t, 0.0, lambda / t};
    if (g.x == 1 && g.y == 0) return {0.0, nu * rho / t, nu / t};
    if (g.x == 1 && g.y == 1) return {0.0, 0.0, -1.0 / t};
    return {};
}

// The parameter vector: attack[0..n), defence[0..n), μ, h.
struct Theta {
    Eigen::VectorXd attack, defence;
    double mu = 0.0, home = 0.0;
};

class Solver {
public:
    Solver(std::vector<Game> games, int teams, Eigen::VectorXd precision)
        : games_(std::move(games)), n_(teams), precision_(std::move(precision)) {}

    double eta_home(const Theta& t, const Game& g) const {
        return t.mu + (g.neutral ? 0.0 : t.home) + t.attack[g.home] - t.defence[g.away];
    }
    double eta_away(const Theta& t, const Game& g) const {
        return t.mu + t.attack[g.away] - t.defence[g.home];
    }

    // Weighted log-likelihood with −log y! and τ; `penalised` subtracts the shrinkage prior.
    double log_likelihood(const Theta& t, double rho, bool penalised) const {
        double ll = 0.0;
        for (const auto& g : games_) {
            const double eh = eta_home(t, g), ea = eta_away(t, g);
            const double lh = std::exp(eh), la = std::exp(ea);
            double term = g.x * eh - lh - std::lgamma(g.x + 1.0) + g.y * ea - la - std::lgamma(g.y + 1.0);
            if (rho != 0.0) term += std::log(dixon_coles_tau(g.x, g.y, lh, la, rho));
            ll += g.w * term;
        }
        if (penalised)
            ll -= 0.5 * (precision_.array() * (t.attack.array().square() + t.defence.array().square())).sum();
        return ll;
    }

    // One Newton step on the constrained, penalised problem at fixed ρ. Returns the step.
    // The KKT system is ordered [attack | defence, μ, h, ν_attack, ν_defence]; the attack
    // block of the information is diagonal, so it is eliminated first (Schur complement).
    void assemble(const Theta& t, double rho) {
        const int m = n_ + 4;
        a_diag_ = precision_;
        b_ = Eigen::MatrixXd::Zero(n_, m);
        k_ = Eigen::MatrixXd::Zero(m, m);
        k_.diagonal().head(n_) = precision_;
        g_x_ = -precision_.cwiseProduct(t.attack);
        g_y_ = Eigen::VectorXd::Zero(m);
        g_y_.head(n_) = -precision_.cwiseProduct(t.defence);
        const int mu = n_, h = n_ + 1;
        for (const auto& g : games_) {
            const double lh = std::exp(eta_home(t, g)), la = std::exp(eta_away(t, g));
            const TauSlopes s = rho != 0.0 ? tau_slopes(g, lh, la, rho) : TauSlopes{};
            // Scores of η_home and η_away; information w·λ (the τ curvature is left out: a
            // quasi-Newton step with the exact gradient, safeguarded by the line search).
            const double sh = g.w * (g.x - lh + s.home), sa = g.w * (g.y - la + s.away);
            const double ih = g.w * lh, ia = g.w * la;
            const bool home_term = !g.neutral;
            // η_home = μ + h + a_home − d_away
            add_score_term(g.home, g.away, mu, sh, ih);
            if (home_term) {
                g_y_[h] += sh;
                b_(g.home, h) += ih;
                k_(g.away, h) -= ih;
                k_(mu, h) += ih;
                k_(h, h) += ih;
            }
            // η_away = μ + a_away − d_home
            add_score_term(g.away, g.home, mu, sa, ia);
        }
        // Constraint rows: Σ attack = 0 (ν_attack), Σ defence = 0 (ν_defence).
        b_.col(n_ + 2).setOnes();
        for (int i = 0; i < n_; ++i) k_(i, n_ + 3) = 1.0;
        // Symmetrise K (only the upper triangle was accumulated for the d/μ/h couplings).
        const Eigen::MatrixXd full = k_.selfadjointView<Eigen::Upper>();
        k_ = full;
        const Eigen::MatrixXd w = a_diag_.cwiseInverse().asDiagonal() * b_;  // A⁻¹B
        schur_ = k_ - b_.transpose() * w;
        lu_.compute(schur_);
        w_ = w;
    }

    Theta newton_step() const {
        const Eigen::VectorXd ax = g_x_.cwiseQuotient(a_diag_);
        const Eigen::VectorXd dy = lu_.solve(g_y_ - b_.transpose() * ax);
        Theta step;
        step.attack = ax - w_ * dy;
        step.defence = dy.head(n_);
        step.mu = dy[n_];
        step.home = dy[n_ + 1];
        return step;
    }

    // Standard errors: square roots of the diagonal of the constrained inverse information
    // (the parameter block of the inverse KKT matrix).
    void standard_errors(Eigen::VectorXd& attack_se, Eigen::VectorXd& defence_se, double& mu_se,
                         double& home_se) const {
        const Eigen::MatrixXd s_inv = lu_.inverse();
        // Attack block of the inverse: A⁻¹ + (A⁻¹B) S⁻¹ (A⁻¹B)ᵀ; only its diagonal is needed.
        const Eigen::VectorXd through_schur = (w_ * s_inv).cwiseProduct(w_).rowwise().sum();
        attack_se = (a_diag_.cwiseInverse() + through_schur).cwiseMax(0.0).cwiseSqrt();
        defence_se = s_inv.diagonal().head(n_).cwiseMax(0.0).cwiseSqrt();
        mu_se = std::sqrt(std::max(s_inv(n_, n_), 0.0));
        home_se = std::sqrt(std::max(s_inv(n_ + 1, n_ + 1), 0.0));
    }

    // ρ maximising the τ log-likelihood with λ, ν held: the function is concave in ρ, so
    // bisection on its slope within the range where every τ stays positive.
    double best_rho(const Theta& t, double& second_derivative) const {
        double lo = -0.999, hi = 0.999;
        for (const auto& g : games_) {
            const double lh = std::exp(eta_home(t, g)), la = std::exp(eta_away(t, g));
            if (g.x == 0 && g.y == 0) hi = std::min(hi, 1.0 / (lh * la));
            if (g.x == 0 && g.y == 1) lo = std::max(lo, -1.0 / lh);
            if (g.x == 1 && g.y == 0) lo = std::max(lo, -1.0 / la);
        }
        const double margin = 1e-9 * (hi - lo);
        lo += margin;
        hi -= margin;
        auto slope = [&](double rho, double* curvature) {
            double d1 = 0.0, d2 = 0.0;
            for (const auto& g : games_) {
                if (g.x > 1 || g.y > 1) continue;
                const double lh = std::exp(eta_home(t, g)), la = std::exp(eta_away(t, g));
                const double s = tau_slopes(g, lh, la, rho).rho;
                d1 += g.w * s;
                d2 -= g.w * s * s;
            }
            if (curvature) *curvature = d2;
            return d1;
        };
        for (int i = 0; i < 200 && hi - lo > 1e-14; ++i) {
            const double mid = 0.5 * (lo + hi);
            (slope(mid, nullptr) > 0.0 ? lo : hi) = mid;
        }
        const double rho = 0.5 * (lo + hi);
        slope(rho, &second_derivative);
        return rho;
    }

    int teams() const { return n_; }

private:
    // One side's linear predictor μ + a_attacker − d_defender: its score `score` and
    // information `info` added to the gradient and to the blocks of the Newton system.
    void add_score_term(int attacker, int defender, int mu, double score, double info) {
        g_x_[attacker] += score;
        g_y_[defender] -= score;
        g_y_[mu] += score;
        a_diag_[attacker] += info;
        b_(attacker, defender) -= info;
        b_(attacker, mu) += info;
        k_(defender, defender) += info;
        k_(defender, mu) -= info;
        k_(mu, mu) += info;
    }

    std::vector<Game> games_;
    int n_;
    Eigen::VectorXd precision_;
    Eigen::VectorXd a_diag_, g_x_, g_y_;
    Eigen::MatrixXd b_, k_, schur_, w_;
    Eigen::PartialPivLU<Eigen::MatrixXd> lu_;
};

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

// Newton iterations with step halving at fixed ρ; returns iterations used.
int newton(Solver& solver, Theta& t, double rho, const RatingsFitOptions& o, bool& converged) {
    double objective = solver.log_likelihood(t, rho, true);
    for (int it = 1; it <= o.max_iterations; ++it) {
        solver.assemble(t, rho);
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
            converged = true;
            return it;
        }
    }
    converged = false;
    return o.max_iterations;
}

}  // namespace

Ratings fit_ratings(std::span<const MatchResult> matches, const RatingsFitOptions& o) {
    std::optional<int> last_day;
    for (const auto& m : matches)
        if (!o.as_of_day || m.day < *o.as_of_day) last_day = std::max(last_day.value_or(m.day), m.day);
    if (!last_day) throw std::invalid_argument("no match to fit (all on or after the as-of date?)");
    const int reference_day = o.as_of_day.value_or(*last_day + 1);

    std::unordered_map<std::string_view, int> index;
    std::vector<std::string_view> names;
    std::vector<Game> games;
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
        const double w = std::exp(-o.xi * (reference_day - m.day));
        if (w < o.min_weight) continue;
        const int h = team(m.home), a = team(m.away);
        games.push_back({h, a, m.home_goals, m.away_goals, m.neutral, w});
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

    Theta t;
    t.attack = Eigen::VectorXd::Zero(n);
    t.defence = Eigen::VectorXd::Zero(n);
    t.mu = std::log(std::max(goals / weight_total, 1e-3));
    double rho = 0.0;
    if (o.start) {
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

    Solver solver(std::move(games), n, precision);
    bool converged = false;
    int iterations = newton(solver, t, rho, o, converged);
    double rho_curvature = 0.0;
    if (o.fit_rho) {
        for (int round = 0; round < 50; ++round) {
            const double next = solver.best_rho(t, rho_curvature);
            const bool settled = std::abs(next - rho) < 1e-10;
            rho = next;
            iterations += newton(solver, t, rho, o, converged);
            if (settled) break;
        }
        solver.best_rho(t, rho_curvature);
    }

    r.intercept = t.mu;
    r.home_advantage = t.home;
    r.rho = rho;
    r.diagnostics.iterations = iterations;
    r.diagnostics.converged = converged;
    if (!converged)
        r.diagnostics.warnings.push_back("Newton did not converge in " + std::to_string(o.max_iterations) +
                                         " iterations");
    r.diagnostics.log_likelihood = solver.log_likelihood(t, rho, false);

    Eigen::VectorXd attack_se = Eigen::VectorXd::Zero(n), defence_se = Eigen::VectorXd::Zero(n);
    if (o.standard_errors) {
        solver.assemble(t, rho);
        solver.standard_errors(attack_se, defence_se, r.intercept_se, r.home_advantage_se);
        if (o.fit_rho && rho_curvature < 0.0) r.rho_se = std::sqrt(-1.0 / rho_curvature);
    }
    r.teams.reserve(static_cast<std::size_t>(n));
    for (int i = 0; i < n; ++i) {
        const auto u = static_cast<std::size_t>(i);
        r.teams.push_back({std::string(names[u]), t.attack[i], t.defence[i], attack_se[i], defence_se[i],
                           counts[u], weights[u], precision[i] > 0.0});
    }
    std::sort(r.teams.begin(), r.teams.end(), [](const auto& a, const auto& b) { return a.name < b.name; });
    return r;
}

}  // namespace liveprob::fit
