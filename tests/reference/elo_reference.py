"""The naive Elo reference written again from the published formula, for the C++ check.

Elo ratings for national football teams as commonly published (constants from memory, as the
project's issue states them): R_new = R_old + K * G * (W - W_e), W_e = 1 / (10^(-dr/400) + 1),
dr = R_home - R_away + 100 unless the venue is neutral; K 60 world finals,
40 qualifiers (a name containing "qualification"), 20 friendlies ("Friendly"), 50 any other
tournament (the world finals: the competition whose qualifying rounds, "<name> qualification",
have the most results; no name is written here); G = 1 for a goal difference of 0 or 1, 1.5 for 2, (11 + N) / 8 for N >= 3; new teams
1500. Every match of a day is priced from the ratings before that day. Then Poisson means
log-linear in dr/400, fitted by statsmodels' Poisson GLM on the results of [FROM, TO).

usage: elo_reference.py results.csv FROM TO
prints "name value nan" lines: home_intercept, home_slope, away_intercept, away_slope, n, and
dr<line> for every result of [FROM, TO) (its line in results.csv).
"""
import csv
import sys
from datetime import date

import numpy as np
import statsmodels.api as sm


def k_of(tournament, world_finals):
    if tournament == "Friendly":
        return 20.0
    if "qualification" in tournament:
        return 40.0
    if tournament == world_finals:
        return 60.0
    return 50.0


def g_of(goal_difference):
    n = abs(goal_difference)
    return 1.0 if n <= 1 else (1.5 if n == 2 else (11.0 + n) / 8.0)


def main():
    path, start, end = sys.argv[1], date.fromisoformat(sys.argv[2]), date.fromisoformat(sys.argv[3])
    rows, seen = [], set()
    with open(path, newline="", encoding="utf-8") as f:
        for line, r in enumerate(csv.DictReader(f), start=2):
            try:
                d = date.fromisoformat(r["date"])
                hs, as_ = int(r["home_score"]), int(r["away_score"])
            except ValueError:
                continue
            key = (d, r["home_team"], r["away_team"])
            if key in seen:
                continue
            seen.add(key)
            rows.append((d, line, r["home_team"], r["away_team"], hs, as_,
                         r["neutral"] in ("TRUE", "True", "true", "1"), r["tournament"]))
    qualifying = {}
    for r in rows:
        if r[7].endswith(" qualification"):
            name = r[7][: -len(" qualification")]
            qualifying[name] = qualifying.get(name, 0) + 1
    world_finals = max(sorted(qualifying), key=lambda n: qualifying[n])
    rows.sort(key=lambda x: x[0])  # stable: file order within a day
    rating = {}
    dr_of = {}
    i = 0
    while i < len(rows):
        j = i
        while j < len(rows) and rows[j][0] == rows[i][0]:
            j += 1
        change = {}
        for d, line, h, a, hs, as_, neutral, t in rows[i:j]:
            dr = rating.get(h, 1500.0) - rating.get(a, 1500.0) + (0.0 if neutral else 100.0)
            dr_of[line] = dr
            we = 1.0 / (10.0 ** (-dr / 400.0) + 1.0)
            w = 1.0 if hs > as_ else (0.5 if hs == as_ else 0.0)
            points = k_of(t, world_finals) * g_of(hs - as_) * (w - we)
            change[h] = change.get(h, 0.0) + points
            change[a] = change.get(a, 0.0) - points
        for team, points in change.items():
            rating[team] = rating.get(team, 1500.0) + points
        i = j
    window = [r for r in rows if start <= r[0] < end]
    x = np.array([dr_of[r[1]] / 400.0 for r in window])
    X = sm.add_constant(x)
    home = sm.GLM(np.array([r[4] for r in window]), X, family=sm.families.Poisson()).fit(tol=1e-13)
    away = sm.GLM(np.array([r[5] for r in window]), X, family=sm.families.Poisson()).fit(tol=1e-13)
    print(f"home_intercept {home.params[0]!r} nan")
    print(f"home_slope {home.params[1]!r} nan")
    print(f"away_intercept {away.params[0]!r} nan")
    print(f"away_slope {away.params[1]!r} nan")
    print(f"n {len(window)} nan")
    for r in window:
        print(f"dr{r[1]} {dr_of[r[1]]!r} nan")


if __name__ == "__main__":
    main()
