"""Reference fit for the rating model with the goal-level shrinkage: SciPy's trust-region Newton
optimiser (exact gradient and Hessian) on a log-likelihood written here independently of the
engine.

Model (the engine's): home goals ~ Poisson(exp(mu + h*[not neutral] + a_home - d_away)), away
goals ~ Poisson(exp(mu + a_away - d_home)), sum(a) = sum(d) = 0 (sum-to-zero coding: the last
team is minus the sum of the others), maximising the weighted log-likelihood minus
q/2 * sum_i (a_i - d_i)^2 over every team, the last included.
Reads the games CSV (home index, away index, home goals, away goals, neutral 0/1, weight).
Prints "name value nan" lines (intercept, home, attack<i>, defence<i>, penalised objective).
Usage: level_shrinkage_reference.py GAMES.csv N_TEAMS Q
"""
import sys

import numpy as np
from scipy.optimize import minimize
from scipy.special import gammaln


def main():
    games = np.loadtxt(sys.argv[1], delimiter=",", ndmin=2)
    n, q = int(sys.argv[2]), float(sys.argv[3])
    # Parameters theta = [mu, h, a_0..a_{n-2}, d_0..d_{n-2}]; the last team's a and d are minus
    # the sum of the others (sum-to-zero coding). One design row per side of every game.
    coding = np.vstack([np.eye(n - 1), -np.ones((1, n - 1))])
    rows, goals, weights = [], [], []
    for home, away, hg, ag, neutral, w in games:
        home, away = int(home), int(away)
        for scorer, conceder, y, home_side in ((home, away, hg, neutral == 0), (away, home, ag, False)):
            rows.append(np.concatenate([[1.0, 1.0 if home_side else 0.0], coding[scorer], -coding[conceder]]))
            goals.append(y)
            weights.append(w)
    x, y, w = np.array(rows), np.array(goals), np.array(weights)
    # The level a - d of every team, the last included, as a linear map of theta.
    level = np.hstack([np.zeros((n, 2)), coding, -coding])

    def objective(theta):
        eta = x @ theta
        ll = np.sum(w * (y * eta - np.exp(eta) - gammaln(y + 1)))
        return -(ll - 0.5 * q * np.sum((level @ theta) ** 2))

    def gradient(theta):
        eta = x @ theta
        return -(x.T @ (w * (y - np.exp(eta))) - q * level.T @ (level @ theta))

    def hessian(theta):
        eta = x @ theta
        return x.T @ (x * (w * np.exp(eta))[:, None]) + q * level.T @ level

    start = np.zeros(2 * n)
    start[0] = np.log(max(np.sum(w * y) / np.sum(w), 1e-3))
    fit = minimize(objective, start, jac=gradient, hess=hessian, method="trust-exact",
                   options={"gtol": 1e-12, "maxiter": 1000})
    theta = fit.x
    a, d = coding @ theta[2:n + 1], coding @ theta[n + 1:]
    print(f"intercept {theta[0]!r} nan")
    print(f"home {theta[1]!r} nan")
    for i in range(n):
        print(f"attack{i} {a[i]!r} nan")
        print(f"defence{i} {d[i]!r} nan")
    print(f"objective {-fit.fun!r} nan")
    print(f"gradient_norm {np.max(np.abs(gradient(theta)))!r} nan")


if __name__ == "__main__":
    main()
