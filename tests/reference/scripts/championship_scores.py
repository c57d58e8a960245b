"""Independent reading of a championship file for the import test: per match its number, the
score after regulation (ft), after extra time (et, or - when none), the shoot-out (p, or -), and
the goal minutes listed per side. Python's json module, nothing of the project.
Usage: championship_scores.py FILE OUT.tsv
Each output line: num<TAB>ft<TAB>et<TAB>p<TAB>home minutes<TAB>away minutes (pairs as h-a, minutes as m or m+offset)
"""
import json
import sys

data = json.load(open(sys.argv[1], encoding="utf-8"))
pair = lambda p: f"{p[0]}-{p[1]}" if p else "-"
minute = lambda g: f"{g['minute']}+{g['offset']}" if g.get("offset") else str(g["minute"])
with open(sys.argv[2], "w") as out:
    for r in data["rounds"]:
        for m in r["matches"]:
            s = m["score"]
            h = ",".join(minute(g) for g in m.get("goals1", []))
            a = ",".join(minute(g) for g in m.get("goals2", []))
            out.write(f"{m['num']}\t{pair(s['ft'])}\t{pair(s.get('et'))}\t{pair(s.get('p'))}\t{h}\t{a}\n")
