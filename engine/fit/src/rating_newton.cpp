#include "rating_newton.hpp"

#include <algorithm>
#include <cmath>

#include "liveprob/fit/dixon_coles.hpp"

namespace liveprob::fit::detail {

TauSlopes tau_slopes(const RatingGame& g, double lambda, double nu, double rho) {
    const double t = dixon_coles_tau(g.x, g.y, lambda, nu, rho);
    if (g.x == 0 && g.y == 0)
        return {-lambda * nu * rho / t, -lambda * nu * rho / t, -lambda * nu / t};
    if (g.x == 0 && g.y == 1) return {lambda * rho / t, 0.0, lambda / t};
    if (g.x == 1 && g.y == 0) return {0.0, nu * rho / t, nu / t};
    if (g.x == 1 && g.y == 1) return {0.0, 0.0, -1.0 / t};
    return {};
}

RatingNewtonSystem::RatingNewtonSystem(std::vector<RatingGame> games, int teams,
                                       Eigen::VectorXd precision, double level_precision)
    : games_(std::move(games)), n_(teams), precision_(std::move(precision)),
      level_precision_(level_precision) {
    // Every (attacker, defender) pair that occurs, numbered in attacker order through an
    // n × n table (n is at most a few hundred teams).
    const auto n = static_cast<std::size_t>(n_);
    constexpr int kAbsent = -1, kPresent = -2;
    std::vector<int> table(n * n, kAbsent);
    for (const auto& g : games_) {
        table[static_cast<std::size_t>(g.home) * n + static_cast<std::size_t>(g.away)] = kPresent;
        table[static_cast<std::size_t>(g.away) * n + static_cast<std::size_t>(g.home)] = kPresent;
    }
    if (level_precision_ > 0.0)
        for (std::size_t i = 0; i < n; ++i) table[i * n + i] = kPresent;
    pair_start_.assign(n + 1, 0);
    for (std::size_t i = 0; i < n; ++i) {
        pair_start_[i] = static_cast<int>(pair_attacker_.size());
        for (std::size_t j = 0; j < n; ++j)
            if (table[i * n + j] == kPresent) {
                table[i * n + j] = static_cast<int>(pair_attacker_.size());
                pair_attacker_.push_back(static_cast<int>(i));
                pair_defender_.push_back(static_cast<int>(j));
            }
    }
    pair_start_[n] = static_cast<int>(pair_attacker_.size());
    has_home_term_ =
        std::any_of(games_.begin(), games_.end(), [](const RatingGame& g) { return !g.neutral; });
    home_pair_.reserve(games_.size());
    away_pair_.reserve(games_.size());
    for (const auto& g : games_) {
        home_pair_.push_back(
            table[static_cast<std::size_t>(g.home) * n + static_cast<std::size_t>(g.away)]);
        away_pair_.push_back(
            table[static_cast<std::size_t>(g.away) * n + static_cast<std::size_t>(g.home)]);
    }
    if (level_precision_ > 0.0)
        for (std::size_t i = 0; i < n; ++i) self_pair_.push_back(table[i * n + i]);
}

double RatingNewtonSystem::eta_home(const RatingParams& t, const RatingGame& g) const {
    return t.mu + (g.neutral ? 0.0 : t.home) + t.attack[g.home] - t.defence[g.away];
}

double RatingNewtonSystem::eta_away(const RatingParams& t, const RatingGame& g) const {
    return t.mu + t.attack[g.away] - t.defence[g.home];
}

double RatingNewtonSystem::log_likelihood(const RatingParams& t, double rho, bool penalised) const {
    double ll = 0.0;
    for (const auto& g : games_) {
        const double eh = eta_home(t, g), ea = eta_away(t, g);
        const double lh = std::exp(eh), la = std::exp(ea);
        double term = g.x * eh - lh + g.y * ea - la - g.log_factorials;
        if (rho != 0.0) term += std::log(dixon_coles_tau(g.x, g.y, lh, la, rho));
        ll += g.w * term;
    }
    if (penalised) {
        ll -= 0.5 *
              (precision_.array() * (t.attack.array().square() + t.defence.array().square())).sum();
        ll -= 0.5 * level_precision_ * (t.attack - t.defence).squaredNorm();
    }
    return ll;
}

// One side's linear predictor μ + [h] + a_attacker − d_defender: its score and information
// added to the gradient and to the blocks A, B (pair, μ and h columns) and K (lower triangle).
void RatingNewtonSystem::add_side(int attacker, int defender, int pair, bool home_term,
                                  double score, double info) {
    const int mu = n_, h = n_ + 1;
    g_a_[attacker] += score;
    g_y_[defender] -= score;
    g_y_[mu] += score;
    a_diag_[attacker] += info;
    pair_value_[pair] -= info;
    b_mu_[attacker] += info;
    k_(defender, defender) += info;
    k_(mu, defender) -= info;
    k_(mu, mu) += info;
    if (home_term) {
        g_y_[h] += score;
        b_h_[attacker] += info;
        k_(h, defender) -= info;
        k_(h, mu) += info;
        k_(h, h) += info;
    }
}

bool RatingNewtonSystem::assemble(const RatingParams& t, double rho) {
    const int m = n_ + 2;
    a_diag_ = precision_;
    pair_value_ = Eigen::VectorXd::Zero(static_cast<Eigen::Index>(pair_attacker_.size()));
    b_mu_ = Eigen::VectorXd::Zero(n_);
    b_h_ = Eigen::VectorXd::Zero(n_);
    k_.setZero(m, m);
    k_.diagonal().head(n_) = precision_;
    g_a_ = -precision_.cwiseProduct(t.attack);
    g_y_ = Eigen::VectorXd::Zero(m);
    g_y_.head(n_) = -precision_.cwiseProduct(t.defence);
    // The level penalty q/2·(a_i − d_i)²: information q·[[1, −1], [−1, 1]] on (a_i, d_i), entered
    // like one more game side of team i against itself.
    for (int i = 0; i < static_cast<int>(self_pair_.size()); ++i) {
        const double excess = level_precision_ * (t.attack[i] - t.defence[i]);
        g_a_[i] -= excess;
        g_y_[i] += excess;
        a_diag_[i] += level_precision_;
        k_(i, i) += level_precision_;
        pair_value_[self_pair_[static_cast<std::size_t>(i)]] -= level_precision_;
    }
    for (std::size_t k = 0; k < games_.size(); ++k) {
        const RatingGame& g = games_[k];
        const double lh = std::exp(eta_home(t, g)), la = std::exp(eta_away(t, g));
        const TauSlopes s = rho != 0.0 ? tau_slopes(g, lh, la, rho) : TauSlopes{};
        // Scores of η_home and η_away; information w·λ (the τ curvature is left out: a
        // quasi-Newton step with the exact gradient, safeguarded by the line search).
        add_side(g.home, g.away, home_pair_[k], !g.neutral, g.w * (g.x - lh + s.home), g.w * lh);
        add_side(g.away, g.home, away_pair_[k], false, g.w * (g.y - la + s.away), g.w * la);
    }
    if (!(a_diag_.minCoeff() > 0.0)) return false;  // a team without information

    // ρ·CᵀC: scaled so that the constrained directions weigh like an average team.
    rho_penalty_ = a_diag_.mean() / n_;
    a_inv_ = a_diag_.cwiseInverse();
    gamma_ = rho_penalty_ / (1.0 + rho_penalty_ * a_inv_.sum());

    // S = K + ρ1_d1_dᵀ − BᵀA⁻¹B + γ uuᵀ (lower triangle), u = BᵀA⁻¹1.
    Eigen::MatrixXd& s = k_;
    std::vector<std::pair<int, double>> row;
    for (int i = 0; i < n_; ++i) {
        row.clear();
        for (int p = pair_start_[static_cast<std::size_t>(i)];
             p < pair_start_[static_cast<std::size_t>(i) + 1]; ++p)
            row.emplace_back(pair_defender_[static_cast<std::size_t>(p)], pair_value_[p]);
        row.emplace_back(n_, b_mu_[i]);
        if (b_h_[i] != 0.0) row.emplace_back(n_ + 1, b_h_[i]);
        const double inv = a_inv_[i];
        for (std::size_t x = 0; x < row.size(); ++x) {
            const double vx = row[x].second * inv;
            for (std::size_t z = 0; z <= x; ++z) {
                const int r = std::max(row[x].first, row[z].first),
                          c = std::min(row[x].first, row[z].first);
                s(r, c) -= vx * row[z].second;
            }
        }
    }
    const Eigen::VectorXd u = b_transpose_times(a_inv_);
    for (int c = 0; c < m; ++c) {
        for (int r = c; r < m; ++r) s(r, c) += gamma_ * u[r] * u[c];
        if (c < n_)
            for (int r = c; r < n_; ++r) s(r, c) += rho_penalty_;
    }
    // Every match at a neutral venue: h has no information and stays where it is (Δh = 0).
    if (!has_home_term_) s(n_ + 1, n_ + 1) = 1.0;
    schur_.compute(s);
    if (schur_.info() != Eigen::Success) return false;

    Vectors ca{Eigen::VectorXd::Ones(n_), Eigen::VectorXd::Zero(m)};
    Vectors cd{Eigen::VectorXd::Zero(n_), Eigen::VectorXd::Zero(m)};
    cd.y.head(n_).setOnes();
    z_attack_ = solve_m(ca);
    z_defence_ = solve_m(cd);
    constraint_gram_ << z_attack_.a.sum(), z_defence_.a.sum(), z_attack_.y.head(n_).sum(),
        z_defence_.y.head(n_).sum();
    return std::isfinite(constraint_gram_.sum());
}

Eigen::VectorXd RatingNewtonSystem::attack_block_solve(const Eigen::VectorXd& v) const {
    const Eigen::VectorXd av = a_inv_.cwiseProduct(v);
    return av - (gamma_ * av.sum()) * a_inv_;
}

Eigen::VectorXd RatingNewtonSystem::b_times(const Eigen::VectorXd& y) const {
    Eigen::VectorXd out = b_mu_ * y[n_] + b_h_ * y[n_ + 1];
    for (std::size_t p = 0; p < pair_attacker_.size(); ++p)
        out[pair_attacker_[p]] += pair_value_[static_cast<Eigen::Index>(p)] * y[pair_defender_[p]];
    return out;
}

Eigen::VectorXd RatingNewtonSystem::b_transpose_times(const Eigen::VectorXd& a) const {
    Eigen::VectorXd out = Eigen::VectorXd::Zero(n_ + 2);
    for (std::size_t p = 0; p < pair_attacker_.size(); ++p)
        out[pair_defender_[p]] += pair_value_[static_cast<Eigen::Index>(p)] * a[pair_attacker_[p]];
    out[n_] = b_mu_.dot(a);
    out[n_ + 1] = b_h_.dot(a);
    return out;
}

RatingNewtonSystem::Vectors RatingNewtonSystem::solve_m(const Vectors& r) const {
    const Eigen::VectorXd t = attack_block_solve(r.a);
    Vectors out;
    out.y = schur_.solve(r.y - b_transpose_times(t));
    out.a = attack_block_solve(r.a - b_times(out.y));
    return out;
}

RatingParams RatingNewtonSystem::newton_step() const {
    const Vectors z = solve_m({g_a_, g_y_});
    const Eigen::Vector2d nu =
        constraint_gram_.partialPivLu().solve(Eigen::Vector2d(z.a.sum(), z.y.head(n_).sum()));
    RatingParams step;
    step.attack = z.a - nu[0] * z_attack_.a - nu[1] * z_defence_.a;
    const Eigen::VectorXd y = z.y - nu[0] * z_attack_.y - nu[1] * z_defence_.y;
    step.defence = y.head(n_);
    step.mu = y[n_];
    step.home = y[n_ + 1];
    return step;
}

void RatingNewtonSystem::standard_errors(Eigen::VectorXd& attack_se, Eigen::VectorXd& defence_se,
                                         double& mu_se, double& home_se) const {
    const int m = n_ + 2;
    const Eigen::MatrixXd s_inv = schur_.solve(Eigen::MatrixXd::Identity(m, m));
    // W = (A + ρ11ᵀ)⁻¹B = A⁻¹B − γ (A⁻¹1) uᵀ, dense.
    Eigen::MatrixXd w = Eigen::MatrixXd::Zero(n_, m);
    for (std::size_t p = 0; p < pair_attacker_.size(); ++p)
        w(pair_attacker_[p], pair_defender_[p]) +=
            pair_value_[static_cast<Eigen::Index>(p)] * a_inv_[pair_attacker_[p]];
    w.col(n_) = a_inv_.cwiseProduct(b_mu_);
    w.col(n_ + 1) = a_inv_.cwiseProduct(b_h_);
    w -= gamma_ * a_inv_ * b_transpose_times(a_inv_).transpose();
    // diag M⁻¹: attack block (A + ρ11ᵀ)⁻¹ + W S⁻¹ Wᵀ, (defence, μ, h) block S⁻¹.
    Eigen::VectorXd diag_a =
        a_inv_ - gamma_ * a_inv_.cwiseProduct(a_inv_) + (w * s_inv).cwiseProduct(w).rowwise().sum();
    Eigen::VectorXd diag_y = s_inv.diagonal();
    // Minus the constraint part M⁻¹Cᵀ (C M⁻¹ Cᵀ)⁻¹ C M⁻¹, row by row.
    const Eigen::Matrix2d g_inv = constraint_gram_.inverse();
    auto correction = [&](double za, double zd) {
        const Eigen::Vector2d z(za, zd);
        return z.dot(g_inv * z);
    };
    for (int i = 0; i < n_; ++i) diag_a[i] -= correction(z_attack_.a[i], z_defence_.a[i]);
    for (int i = 0; i < m; ++i) diag_y[i] -= correction(z_attack_.y[i], z_defence_.y[i]);
    attack_se = diag_a.cwiseMax(0.0).cwiseSqrt();
    defence_se = diag_y.head(n_).cwiseMax(0.0).cwiseSqrt();
    mu_se = std::sqrt(std::max(diag_y[n_], 0.0));
    home_se = has_home_term_ ? std::sqrt(std::max(diag_y[n_ + 1], 0.0)) : 0.0;
}

// The τ log-likelihood is concave in ρ: bisection on its slope within the range where every τ
// stays positive.
double RatingNewtonSystem::best_rho(const RatingParams& t, double& second_derivative) const {
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

}  // namespace liveprob::fit::detail
