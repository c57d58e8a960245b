"""Reference fit for the rating model: a Poisson GLM fitted by statsmodels.

Reads a CSV of games (home index, away index, home goals, away goals, neutral 0/1, weight) for
teams 0..n-1 and fits log E[goals] = mu + h*[home side, not neutral] + attack_scorer - defence_conceder
with sum-to-zero coding (the last team's attack and defence are minus the sum of the others).
Prints "name value standard_error" lines; the last team's standard errors are printed as nan.
Usage: poisson_glm_reference.py GAMES.csv N_TEAMS
"""
import sys

import numpy as np
import statsmodels.api as sm


def main():
    games = np.loadtxt(sys.argv[1], delimiter=",", ndmin=2)
    n = int(sys.argv[2])
    p = 2 + 2 * (n - 1)
    rows, goals, weights = [], [], []

    def coded(team, sign, offset):
        x = np.zeros(n - 1)
        if team == n - 1:
            x[:] = -1.0
        else:
            x[team] = 1.0
        return sign * x

    for home, away, hg, ag, neutral, w in games:
        home, away = int(home), int(away)
        for scorer, conceder, y, home_side in ((home, away, hg, neutral == 0), (away, home, ag, False)):
            x = np.zeros(p)
            x[0] = 1.0
            x[1] = 1.0 if home_side else 0.0
            x[2:2 + n - 1] = coded(scorer, 1.0, 0)
            x[2 + n - 1:] = coded(conceder, -1.0, 0)
            rows.append(x)
            goals.append(y)
            weights.append(w)
    model = sm.GLM(np.array(goals), np.array(rows), family=sm.families.Poisson(),
                   freq_weights=np.array(weights))
    fit = model.fit(tol=1e-13, maxiter=200)
    b, se = fit.params, fit.bse
    print(f"intercept {b[0]!r} {se[0]!r}")
    print(f"home {b[1]!r} {se[1]!r}")
    attack = list(b[2:2 + n - 1]) + [-sum(b[2:2 + n - 1])]
    defence = list(b[2 + n - 1:]) + [-sum(b[2 + n - 1:])]
    attack_se = list(se[2:2 + n - 1]) + [float("nan")]
    defence_se = list(se[2 + n - 1:]) + [float("nan")]
    for i in range(n):
        print(f"attack{i} {attack[i]!r} {attack_se[i]!r}")
        print(f"defence{i} {defence[i]!r} {defence_se[i]!r}")
    print(f"loglik {fit.llf!r} nan")


if __name__ == "__main__":
    main()
