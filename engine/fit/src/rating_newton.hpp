// The Newton system of the Dixon–Coles rating fit (private to the engine).
//
// Parameters: attack a[0..n), defence d[0..n), intercept μ, home advantage h, with the
// constraints Σa = 0 and Σd = 0, a Gaussian penalty of precision p_i on a_i and d_i (the
// shrinkage of teams with few matches) and one of precision q on every team's goal level a_i − d_i
// (how open its matches are, as opposed to how strong it is, a_i + d_i: the level shrinkage). The
// level penalty couples a_i with d_i: it enters B as the pair (i, i). The information matrix has a
// diagonal attack block A, an attack–(defence, μ, h) block B that is sparse (one entry per pair of
// teams that met) and a (defence, μ, h) block K. A Newton step solves the constrained system
//
//     [ H  Cᵀ ] [Δ]   [g]
//     [ C  0  ] [ν] = [0]       H = [[A, B], [Bᵀ, K]],  C = the two sum-to-zero rows,
//
// Adding ρ·CᵀC to H changes no solution of this system (CΔ = 0) but makes the matrix positive
// definite (the likelihood is flat along a += δ, d += δ and along μ += c, a −= c; the added
// term is not). With M = H + ρCᵀC the attack block A + ρ11ᵀ is a diagonal plus a rank-one
// matrix, eliminated in closed form (Sherman–Morrison); the Schur complement
// S = K + ρ1_d1_dᵀ − Bᵀ(A + ρ11ᵀ)⁻¹B is built from the sparse pairs, in O(Σ_i deg_i²), and
// factored by a dense Cholesky of size n + 2. The two constraint multipliers come from a 2×2
// system (range-space method). Compared with forming B densely and factoring the indefinite
// (n + 4) KKT matrix by LU, this removes the O(n³) dense product and halves the factorisation.
#pragma once

#include <Eigen/Dense>

#include <vector>

namespace liveprob::fit::detail {

struct RatingGame {
    int home, away, x, y;
    bool neutral;
    double w;
    double log_factorials;  // log x! + log y!, constant through the fit
};

struct RatingParams {
    Eigen::VectorXd attack, defence;
    double mu = 0.0, home = 0.0;
};

// d log τ / d η_home, d η_away, d ρ for one game (zero outside the four low scores).
struct TauSlopes {
    double home = 0.0, away = 0.0, rho = 0.0;
};
TauSlopes tau_slopes(const RatingGame& g, double lambda, double nu, double rho);

class RatingNewtonSystem {
public:
    RatingNewtonSystem(std::vector<RatingGame> games, int teams, Eigen::VectorXd precision,
                       double level_precision = 0.0);

    // Weighted log-likelihood with −log y! and τ; `penalised` subtracts the shrinkage penalty.
    double log_likelihood(const RatingParams& t, double rho, bool penalised) const;

    // Builds and factors the Newton system at `t` (ρ held). Returns false when the system is
    // singular (the matches leave some ratings undetermined).
    bool assemble(const RatingParams& t, double rho);
    // The Newton step from the last assembled point (constraints kept: ΣΔa = ΣΔd = 0).
    RatingParams newton_step() const;
    // Square roots of the diagonal of the constrained inverse information at the last
    // assembled point: the parameter block of the inverse KKT matrix.
    void standard_errors(Eigen::VectorXd& attack_se, Eigen::VectorXd& defence_se, double& mu_se,
                         double& home_se) const;

    // ρ maximising the τ log-likelihood with λ, ν held; its second derivative there.
    double best_rho(const RatingParams& t, double& second_derivative) const;

    int teams() const { return n_; }

private:
    struct Vectors {  // one vector in the (attack | defence, μ, h) split
        Eigen::VectorXd a, y;
    };
    double eta_home(const RatingParams& t, const RatingGame& g) const;
    double eta_away(const RatingParams& t, const RatingGame& g) const;
    void add_side(int attacker, int defender, int pair, bool home_term, double score, double info);
    // M⁻¹ r by block elimination of the attack block.
    Vectors solve_m(const Vectors& r) const;
    // A⁻¹-with-rank-one: (A + ρ11ᵀ)⁻¹ v.
    Eigen::VectorXd attack_block_solve(const Eigen::VectorXd& v) const;
    Eigen::VectorXd b_times(const Eigen::VectorXd& y) const;            // B y
    Eigen::VectorXd b_transpose_times(const Eigen::VectorXd& a) const;  // Bᵀ a

    std::vector<RatingGame> games_;
    int n_;
    Eigen::VectorXd precision_;
    double level_precision_ = 0.0;
    // Sparse structure: pair k is (attacker pair_attacker_[k], defender pair_defender_[k]);
    // each game side adds to one pair. Pairs are grouped by attacker: pairs of attacker i are
    // [pair_start_[i], pair_start_[i + 1]).
    std::vector<int> pair_attacker_, pair_defender_, pair_start_;
    std::vector<int> home_pair_, away_pair_;  // per game: the pair of each side's scoring
    std::vector<int> self_pair_;              // per team: the pair (i, i) of the level penalty
    bool has_home_term_ = false;              // some match is not at a neutral venue

    // Assembled at the last point.
    Eigen::VectorXd a_diag_, pair_value_, b_mu_, b_h_;
    Eigen::MatrixXd k_;  // (n + 2) square, lower triangle accumulated
    Eigen::VectorXd g_a_, g_y_;
    double rho_penalty_ = 0.0, gamma_ = 0.0;
    Eigen::VectorXd a_inv_;
    Eigen::LLT<Eigen::MatrixXd> schur_;
    Vectors z_attack_, z_defence_;     // M⁻¹ of the two constraint rows
    Eigen::Matrix2d constraint_gram_;  // C M⁻¹ Cᵀ
};

}  // namespace liveprob::fit::detail
