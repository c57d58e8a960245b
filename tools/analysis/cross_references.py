#!/usr/bin/env python3
"""Why the model and the naive Elo reference differ in play: their parts crossed on the same matches.

Both are scored by `liveprob replay --elo-data` on the same matches, and at every bucket both
condition on the same score. Independent Poisson on the model's priors (the report's
`independent_poisson` column) and the Elo reference are then the same kind of forecaster with
two different parts:

  means   the pre-match expected goals (the model's rating fit / Elo's log-linear map);
  timing  the share of a match's goals still to come at each bucket (the model's fitted profile
          with stoppage / Elo's empirical goal-minute histogram).

This script reads the per-match export (`matches.csv` of a replay report) and the same matches
imported as JSON lines (`import --form json`, for each match's score at each bucket and its
priors), recovers each forecaster's parts from its own forecasts, and scores the crossings:

  ip              model means, model timing   (the report's independent_poisson)
  elo             Elo means,   Elo timing     (the report's elo_reference)
  elo_means       Elo means,   model timing
  model_means     model means, Elo timing
  model           the full engine (state effects, no strength update under kappa = infinity)

and, per bucket, the expected goals still to come against the goals that came, and the spread
of the two forecasters' strength differences. RPS differences carry a paired bootstrap 95%
interval (matches resampled with replacement, the same resample for both columns).

Recovery: Elo's means are read from its kick-off forecast (independent Poisson: home win and
away win give both means; within a year both log means are linear in one rating difference,
so they lie on a line, fitted on the well-determined matches, and each match is placed on it);
each forecaster's
remaining share per bucket is the median over matches of (recovered remaining mean) / (prior
mean) (it is one number per bucket for a parameter file, one per year for Elo), found per
match by golden-section search on s in [0, 1] where the lead is at most one goal, and every
recovered forecast is checked against the one the report holds.

Standard library only. Usage:
  cross_references.py REPORT_DIR JSON_STREAMS_DIR [--resamples N] [--seed N] [--spread C...]
                      [--total C...] [--shrink-total C...]
"""
import argparse
import csv
import glob
import json
import math
import os
import random
import statistics
import sys

BUCKETS = [0, 15, 30, 45, 60, 75, 85, 90]
PERIOD_ORDER = {"pre_match": 0, "first_half": 1, "half_time": 2, "second_half": 3}


def outcome_probabilities(lead, home_mean, away_mean):
    """Home win / draw / away win with `lead` standing and independent Poisson goals to come."""

    def pmf(mean):
        p = [math.exp(-mean)]
        tail = 1.0 - p[0]
        k = 1
        while tail > 1e-16 and k < 200:
            p.append(p[-1] * mean / k)
            tail -= p[-1]
            k += 1
        return p

    home, away = pmf(max(0.0, home_mean)), pmf(max(0.0, away_mean))
    f = [0.0, 0.0, 0.0]
    for h, ph in enumerate(home):
        for a, pa in enumerate(away):
            d = lead + h - a
            f[0 if d > 0 else 1 if d == 0 else 2] += ph * pa
    s = sum(f)
    return [x / s for x in f]


def rps(f, result):
    o = [1.0 if result == "home" else 0.0, 1.0 if result == "draw" else 0.0]
    c1 = f[0] - o[0]
    c2 = f[0] + f[1] - o[0] - o[1]
    return 0.5 * (c1 * c1 + c2 * c2)


def recover_means(lead, forecast, start):
    """(home, away) remaining means whose independent Poisson outcome with `lead` is `forecast`."""
    x = [max(start[0], 1e-3), max(start[1], 1e-3)]
    for _ in range(60):
        f = outcome_probabilities(lead, x[0], x[1])
        r = [f[0] - forecast[0], f[2] - forecast[2]]
        if max(abs(r[0]), abs(r[1])) < 1e-10:
            break
        h = 1e-6
        j = []
        for k in range(2):
            y = list(x)
            y[k] += h
            g = outcome_probabilities(lead, y[0], y[1])
            j.append([(g[0] - f[0]) / h, (g[2] - f[2]) / h])
        det = j[0][0] * j[1][1] - j[1][0] * j[0][1]
        if abs(det) < 1e-14:
            break
        d0 = (r[0] * j[1][1] - r[1] * j[1][0]) / det
        d1 = (r[1] * j[0][0] - r[0] * j[0][1]) / det
        # Damped: each mean moves by at most a factor 2 per step and stays below 20.
        x = [min(20.0, max(x[0] / 2, min(2 * x[0], x[0] - d0))),
             min(20.0, max(x[1] / 2, min(2 * x[1], x[1] - d1)))]
    return x


def recover_share(lead, forecast, means):
    """The share s in [0, 1] whose outcome with remaining means s * means is nearest `forecast`."""

    def miss(s):
        f = outcome_probabilities(lead, means[0] * s, means[1] * s)
        return sum((f[k] - forecast[k]) ** 2 for k in range(3))

    lo, hi = 0.0, 1.0
    g = (math.sqrt(5) - 1) / 2
    for _ in range(40):
        a, b = hi - g * (hi - lo), lo + g * (hi - lo)
        if miss(a) < miss(b):
            hi = b
        else:
            lo = a
    return 0.5 * (lo + hi)


def read_streams(folder):
    """match id -> {'prior': (home, away), 'goals': [(period order, clock ms, side)]}"""
    matches = {}
    for path in sorted(glob.glob(os.path.join(folder, "**", "*.jsonl"), recursive=True)):
        with open(path) as f:
            for line in f:
                m = json.loads(line)
                entry = matches.setdefault(m["match"], {"prior": None, "goals": []})
                if m["type"] == "setup":
                    entry["prior"] = (m["prior"]["home"], m["prior"]["away"])
                elif m["type"] == "goal":
                    mm, ss = m["clock"].split(":")
                    clock = (int(mm) * 60 + int(ss)) * 1000
                    entry["goals"].append((PERIOD_ORDER.get(m["period"], 9), clock, m["side"]))
    return matches


def lead_at(goals, minute):
    """The home side's lead as the replay reads bucket `minute` (goals strictly before it)."""
    if minute == 0:
        return 0
    period = 1 if minute <= 45 else 3
    at = minute * 60000
    lead = 0
    for p, clock, side in goals:
        if p < period or (p == period and clock < at):
            lead += 1 if side == "home" else -1
    return lead


def goals_after(goals, minute):
    """Regulation goals after bucket `minute` (the replay's reading)."""
    period = 1 if minute <= 45 else 3
    at = minute * 60000
    n = 0
    for p, clock, _ in goals:
        if p > 3:
            continue
        if minute == 0 or p > period or (p == period and clock >= at):
            n += 1
    return n


def resample_indices(n, resamples, seed):
    """The bootstrap resamples (match indices drawn with replacement), shared by every pair."""
    rng = random.Random(seed)
    return [[rng.randrange(n) for _ in range(n)] for _ in range(resamples)]


def bootstrap(a, b, resamples):
    """mean(a)/mean(b) - 1 with a paired bootstrap 95% interval over the given resamples."""
    point = sum(a) / sum(b) - 1.0
    draws = sorted(sum(map(a.__getitem__, idx)) / sum(map(b.__getitem__, idx)) - 1.0
                   for idx in resamples)
    k = len(draws)
    return point, draws[int(0.025 * k)], draws[min(k - 1, int(0.975 * k))]


def cell(d):
    return "{:+.2f} [{:+.2f},{:+.2f}]".format(100 * d[0], 100 * d[1], 100 * d[2])


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("report")
    ap.add_argument("streams")
    ap.add_argument("--resamples", type=int, default=1000)
    ap.add_argument("--seed", type=int, default=20261202)
    ap.add_argument(
        "--total",
        type=float,
        nargs="*",
        default=[],
        help="also score the model's means with their total scaled by each factor (ratio kept)",
    )
    ap.add_argument(
        "--shrink-total",
        type=float,
        nargs="*",
        default=[],
        help="also score the model's means with log(total) pulled toward its mean: deviation x factor",
    )
    ap.add_argument(
        "--spread",
        type=float,
        nargs="*",
        default=[],
        help="also score Elo means with their log ratio scaled by each factor (total kept)",
    )
    args = ap.parse_args()

    streams = read_streams(args.streams)
    with open(os.path.join(args.report, "matches.csv")) as f:
        rows = list(csv.DictReader(f))
    rows = [r for r in rows if r.get("elo_reference@0:home")]
    if not rows:
        sys.exit("no match with an Elo reference forecast in matches.csv")
    lab = ["0", "15", "30", "45", "60", "75", "85", "90+"]

    def forecast(row, column, b):
        k = "{}@{}:".format(column, lab[b])
        return [float(row[k + "home"]), float(row[k + "draw"]), float(row[k + "away"])]

    # Elo's means from its kick-off forecast. Within a year both log means are linear in the same
    # rating difference, so they lie on one line: fitted on the matches whose forecast pins
    # them well (every outcome at least 0.03), then every match is placed on it by bisection on
    # home win minus away win, which moves monotonically along the line.
    by_year = {}
    for r in rows:
        f = forecast(r, "elo_reference", 0)
        if min(f) >= 0.03:
            m = recover_means(0, f, streams[int(r["match_id"])]["prior"])
            by_year.setdefault(r["date"][:4], []).append((math.log(m[0]), math.log(m[1])))
    line = {}
    for y, pts in by_year.items():
        mx = statistics.fmean(p[0] for p in pts)
        my = statistics.fmean(p[1] for p in pts)
        slope = sum((p[0] - mx) * (p[1] - my) for p in pts) / sum((p[0] - mx) ** 2 for p in pts)
        line[y] = (mx, my, slope)

    def elo_means_of(r):
        mx, my, slope = line[r["date"][:4]]
        f = forecast(r, "elo_reference", 0)
        target = f[0] - f[2]
        lo, hi = -6.0, 3.0
        for _ in range(60):
            t = 0.5 * (lo + hi)
            g = outcome_probabilities(0, math.exp(t), math.exp(my + slope * (t - mx)))
            if g[0] - g[2] < target:
                lo = t
            else:
                hi = t
        t = 0.5 * (lo + hi)
        return (math.exp(t), math.exp(my + slope * (t - mx)))

    # Both remaining shares.
    share_model = [[] for _ in BUCKETS]
    share_elo = {}
    data = []
    for r in rows:
        s = streams[int(r["match_id"])]
        model_mean = s["prior"]
        elo_mean = elo_means_of(r)
        leads = [lead_at(s["goals"], m) for m in BUCKETS]
        year = r["date"][:4]
        for b in range(1, len(BUCKETS)):
            if abs(leads[b]) > 1:  # the outcome barely moves with the share: not used
                continue
            share_model[b].append(
                recover_share(leads[b], forecast(r, "independent_poisson", b), model_mean))
            share_elo.setdefault(year, [[] for _ in BUCKETS])[b].append(
                recover_share(leads[b], forecast(r, "elo_reference", b), elo_mean))
        data.append((r, model_mean, elo_mean, leads, year, s["goals"]))
    sm = [1.0] + [statistics.median(v) for v in share_model[1:]]
    se = {y: [1.0] + [statistics.median(v) for v in lists[1:]] for y, lists in share_elo.items()}

    # Check: the recovered parts give back the report's forecasts.
    worst = 0.0
    for r, mm, em, leads, year, _ in data:
        for b in range(len(BUCKETS)):
            for col, means, share in (
                ("independent_poisson", mm, sm[b]),
                ("elo_reference", em, se[year][b]),
            ):
                f = outcome_probabilities(leads[b], means[0] * share, means[1] * share)
                g = forecast(r, col, b)
                worst = max(worst, max(abs(f[k] - g[k]) for k in range(3)))

    print("matches {}; largest difference between a recovered and a reported forecast {:.1e}".format(
        len(data), worst))
    print("remaining share of goals at each bucket, model (this parameter file):",
          " ".join("{:.3f}".format(x) for x in sm))
    for y in sorted(se):
        print("remaining share, Elo histogram before {}:".format(y),
              " ".join("{:.3f}".format(x) for x in se[y]))

    # Totals: expected goals still to come against goals that came, per bucket.
    print("\ngoals still to come per match after each bucket: realised / model expected / Elo expected")
    for b, m in enumerate(BUCKETS):
        real = sum(goals_after(g, m) for _, _, _, _, _, g in data) / len(data)
        em_ = sum((mm[0] + mm[1]) * sm[b] for _, mm, _, _, _, _ in data) / len(data)
        ee_ = sum((e[0] + e[1]) * se[y][b] for _, _, e, _, y, _ in data) / len(data)
        print("{:>4} {:.3f} {:.3f} ({:+.1f}%) {:.3f} ({:+.1f}%)".format(
            lab[b], real, em_, 100 * (em_ / real - 1), ee_, 100 * (ee_ / real - 1)))

    # Spread of strength differences.
    lm = [math.log(mm[0] / mm[1]) for _, mm, _, _, _, _ in data]
    le = [math.log(e[0] / e[1]) for _, _, e, _, _, _ in data]
    print("\nlog(home mean / away mean): model sd {:.3f}, Elo sd {:.3f}; correlation {:.3f}".format(
        statistics.pstdev(lm), statistics.pstdev(le), statistics.correlation(lm, le)))
    print("total expected goals: model mean {:.3f}, Elo mean {:.3f}; realised {:.3f}".format(
        statistics.fmean(mm[0] + mm[1] for _, mm, _, _, _, _ in data),
        statistics.fmean(e[0] + e[1] for _, _, e, _, _, _ in data),
        statistics.fmean(int(r["home_goals"]) + int(r["away_goals"]) for r, *_ in data)))

    def scale(means, c):
        t = means[0] + means[1]
        g = math.sqrt(means[0] * means[1])
        lr = c * 0.5 * math.log(means[0] / means[1])
        h, a = g * math.exp(lr), g * math.exp(-lr)
        k = t / (h + a)
        return (h * k, a * k)

    def with_total(means, total):
        k = total / (means[0] + means[1])
        return (means[0] * k, means[1] * k)

    # The totals' level and their spread across matches, separated: the model's home/away split
    # with Elo's per-match total brought to the model's average level, and with one total for
    # every match (the model's average).
    level = statistics.fmean(mm[0] + mm[1] for _, mm, _, _, _, _ in data)
    elo_level = statistics.fmean(e[0] + e[1] for _, _, e, _, _, _ in data)
    lt = [math.log(mm[0] + mm[1]) for _, mm, _, _, _, _ in data]
    lte = [math.log(e[0] + e[1]) for _, _, e, _, _, _ in data]
    print("log(total expected goals): model sd {:.3f}, Elo sd {:.3f}; correlation {:.3f}".format(
        statistics.pstdev(lt), statistics.pstdev(lte), statistics.correlation(lt, lte)))

    def split_total(d, b, total):
        m = with_total(d[1], total)
        return outcome_probabilities(d[3][b], m[0] * sm[b], m[1] * sm[b])

    columns = {
        "ip": lambda d, b: outcome_probabilities(d[3][b], d[1][0] * sm[b], d[1][1] * sm[b]),
        "elo": lambda d, b: outcome_probabilities(d[3][b], d[2][0] * se[d[4]][b], d[2][1] * se[d[4]][b]),
        "elo_means": lambda d, b: outcome_probabilities(d[3][b], d[2][0] * sm[b], d[2][1] * sm[b]),
        "model_means": lambda d, b: outcome_probabilities(d[3][b], d[1][0] * se[d[4]][b], d[1][1] * se[d[4]][b]),
        "model": lambda d, b: forecast(d[0], "model", b),
        "split_elo_tot": lambda d, b: split_total(d, b, (d[2][0] + d[2][1]) * level / elo_level),
        "split_one_tot": lambda d, b: split_total(d, b, level),
    }
    log_level = statistics.fmean(lt)
    for c in args.shrink_total:
        columns["total_shrunk_{:g}".format(c)] = (
            lambda c: lambda d, b: split_total(
                d, b, math.exp(log_level + c * (math.log(d[1][0] + d[1][1]) - log_level))))(c)
    for c in args.spread:
        columns["model_spread_{:g}".format(c)] = (
            lambda c: lambda d, b: outcome_probabilities(
                d[3][b], scale(d[1], c)[0] * sm[b], scale(d[1], c)[1] * sm[b]))(c)
    for c in args.total:
        columns["model_total_{:g}".format(c)] = (
            lambda c: lambda d, b: outcome_probabilities(
                d[3][b], c * d[1][0] * sm[b], c * d[1][1] * sm[b]))(c)
    scores = {k: [[rps(fn(d, b), d[0]["result"]) for d in data] for b in range(len(BUCKETS))]
              for k, fn in columns.items()}

    print("\nRPS per bucket")
    print("{:>16} ".format("") + " ".join("{:>8}".format(x) for x in lab))
    for k, v in scores.items():
        print("{:>16} ".format(k) + " ".join("{:>8.5f}".format(sum(x) / len(x)) for x in v))

    pairs = [
        ("ip", "elo", "independent Poisson (model means+timing) vs Elo"),
        ("elo_means", "elo", "timing alone: Elo means, model timing vs Elo timing"),
        ("ip", "elo_means", "means alone: model means vs Elo means, model timing"),
        ("model_means", "elo", "means alone: model means vs Elo means, Elo timing"),
        ("model", "elo_means", "the engine vs Elo means with the model's timing"),
        ("split_elo_tot", "ip", "model's split, Elo's per-match total (at the model's level), vs model means"),
        ("split_one_tot", "ip", "model's split, one total for every match, vs model means"),
    ] + [("model_spread_{:g}".format(c), "ip", "model means, log ratio x{:g}, vs as fitted".format(c))
         for c in args.spread] + [
        ("model_total_{:g}".format(c), "ip", "model means, total x{:g}, vs as fitted".format(c))
        for c in args.total] + [
        ("total_shrunk_{:g}".format(c), "ip",
         "model means, log total pulled toward its mean (x{:g}), vs as fitted".format(c))
        for c in args.shrink_total]
    resamples = resample_indices(len(data), args.resamples, args.seed)
    print("\n% RPS difference [paired bootstrap 95%, {} resamples, seed {}]; negative: first better".format(
        args.resamples, args.seed))
    for a, b, what in pairs:
        print("{}:".format(what))
        print("  " + "  ".join("{}' {}".format(lab[k], cell(bootstrap(scores[a][k], scores[b][k], resamples)))
                               for k in range(len(BUCKETS))))


if __name__ == "__main__":
    main()
