"""Independent reading of the open international data for the import test: for every row of
results.csv, its line number, final score, and the goal minutes per side listed for it in
goalscorers.csv (None when a minute is missing). Python's csv module, nothing of the project.
Usage: international_scores.py DIR OUT.tsv
Each output line: line<TAB>home_score<TAB>away_score<TAB>home minutes (comma list, x when a
record is unusable)<TAB>away minutes<TAB>shootout winner side (h/a/-)<TAB>selected (1/0): the
import's rule written again here: the competition-year has complete goal records for at least 90%
of its scoring matches, this match's records add up to its score, and a match that went beyond
regulation (goals after minute 90, or a shoot-out) was level at the end of regulation (and, with
a shoot-out, at the end).
"""
import csv
import sys
from collections import defaultdict

folder, out_path = sys.argv[1], sys.argv[2]
goals = defaultdict(lambda: ([], []))
broken = set()
with open(f"{folder}/goalscorers.csv", newline="", encoding="utf-8") as f:
    for g in csv.DictReader(f):
        key = (g["date"], g["home_team"], g["away_team"])
        if not g["minute"].isdigit():
            broken.add(key)
            continue
        side = 0 if g["team"] == g["home_team"] else 1 if g["team"] == g["away_team"] else None
        if side is None:
            broken.add(key)
            continue
        goals[key][side].append(int(g["minute"]))
shootouts = {}
with open(f"{folder}/shootouts.csv", newline="", encoding="utf-8") as f:
    for s in csv.DictReader(f):
        shootouts[(s["date"], s["home_team"], s["away_team"])] = s["winner"]
rows = []
seen = set()
with open(f"{folder}/results.csv", newline="", encoding="utf-8") as f:
    reader = csv.DictReader(f)
    for row in reader:
        if not row["home_score"].isdigit() or not row["away_score"].isdigit():
            continue
        key = (row["date"], row["home_team"], row["away_team"])
        if key in seen:
            continue
        seen.add(key)
        rows.append((reader.line_num, key, row))


def complete(key, row):
    if key in broken:
        return False
    h, a = goals[key]
    return len(h) == int(row["home_score"]) and len(a) == int(row["away_score"])


coverage = defaultdict(lambda: [0, 0])
for line, key, row in rows:
    if int(row["home_score"]) + int(row["away_score"]) == 0:
        continue
    c = coverage[(row["tournament"], row["date"][:4])]
    c[0] += 1
    c[1] += complete(key, row)

with open(out_path, "w") as out:
    for line, key, row in rows:
        h, a = (None, None) if key in broken else goals[key]
        winner = shootouts.get(key)
        side = "h" if winner == row["home_team"] else "a" if winner == row["away_team"] else "-"
        c = coverage.get((row["tournament"], row["date"][:4]))
        selected = c is not None and c[1] >= 0.9 * c[0] and complete(key, row)
        if selected:
            reg = [sum(1 for m in h if m <= 90), sum(1 for m in a if m <= 90)]
            beyond = any(m > 90 for m in h + a) or side != "-"
            if beyond and reg[0] != reg[1]:
                selected = False
            if side != "-" and row["home_score"] != row["away_score"]:
                selected = False
        fmt = lambda m: "x" if m is None else ",".join(map(str, sorted(m)))
        out.write(f"{line}\t{row['home_score']}\t{row['away_score']}\t{fmt(h)}\t{fmt(a)}\t{side}\t{int(selected)}\n")
