#!/usr/bin/env python3
"""Writes the two invented providers' recorded samples from the demo league's native feed.

    build/release/tools/liveprob simulate --out DIR --form json
    protocol/mappings/make_samples.py DIR protocol/mappings

Picks a few matches of the invented demo season (league and cup) that between them hold every
message kind the demo produces, writes them as native JSON lines (native.sample.jsonl) and as
the two invented providers' own shapes (harbour.sample.jsonl, meadow.sample.jsonl). The test
`unit/feed mappings: the recorded samples map to the native feed` maps each sample with its
rules file and checks that it gives the very same messages and outputs as the native lines.
Team names are the demo's invented ones; team ids are invented here.
"""
import json
import pathlib
import sys

PERIOD_CODES_HARBOUR = {"pre_match": "PRE", "first_half": "1H", "second_half": "2H",
                        "extra_first": "ET1", "extra_second": "ET2", "shootout": "PEN",
                        "finished": "FT"}
PERIOD_CODES_MEADOW = {"pre_match": 0, "first_half": 1, "second_half": 2, "extra_first": 3,
                       "extra_second": 4, "shootout": 5, "finished": 6}
# Where each period's regular time ends on a 45-minute half; beyond it the clock is stoppage.
REGULAR_END = {"first_half": 45, "second_half": 90, "extra_first": 105, "extra_second": 120}


def clock_ms(text):
    minutes, rest = text.split(":")
    seconds, _, fraction = rest.partition(".")
    return (int(minutes) * 60 + int(seconds)) * 1000 + (int(fraction.ljust(3, "0")) if fraction else 0)


def mm_ss(ms):
    text = f"{ms // 60000:02d}:{ms // 1000 % 60:02d}"
    return text + (f".{ms % 1000:03d}" if ms % 1000 else "")


def harbour_clock(period, text):
    """'67:12' in regular time; stoppage as '45+1:30' (the regular minute, then the extra)."""
    ms = clock_ms(text)
    end = REGULAR_END.get(period)
    if end is not None and ms > end * 60000:
        return f"{end}+{mm_ss(ms - end * 60000).lstrip('0') or '0'}".replace("+:", "+0:")
    return text


def pick_matches(root):
    """Greedy: matches until every kind and every period seen in the demo is covered."""
    files = sorted((root / "league").glob("*.jsonl")) + sorted((root / "cup").glob("*.jsonl"))
    feeds = {f: [json.loads(line) for line in f.read_text().splitlines() if line.strip()]
             for f in files}
    def features(lines):
        return {m["type"] for m in lines} | {m["period"] for m in lines} | \
               {k for m in lines for k in m if k in ("penalty", "own_goal", "second_yellow")} | \
               {"not_running" for m in lines if m.get("running") is False}
    wanted = set().union(*(features(lines) for lines in feeds.values()))
    chosen, covered = [], set()
    while covered != wanted:
        best = max(files, key=lambda f: (len(features(feeds[f]) - covered), -len(feeds[f])))
        chosen.append(best)
        covered |= features(feeds[best])
    return [feeds[f] for f in chosen]


def team_ids(matches):
    names = sorted({m[side] for lines in matches for m in lines if m["type"] == "setup"
                    for side in ("home", "away")})
    return {name: index for index, name in enumerate(names, start=401)}


def harbour(m, ids, sides):
    out = {"fixture": {"id": m["match"]}, "meta": {"seq": m["seq"], "sent_ms": m["time_us"] // 1000},
           "clock": {"phase": PERIOD_CODES_HARBOUR[m["period"]],
                     "shown": harbour_clock(m["period"], m["clock"])}}
    event = {}
    kind = m["type"]
    team = lambda: f"HB-{ids[sides[m['match']][m['side']]]}"
    if kind == "setup":
        event = {"name": "FIXTURE",
                 "home": {"id": f"HB-{ids[m['home']]}", "name": m["home"]},
                 "away": {"id": f"HB-{ids[m['away']]}", "name": m["away"]},
                 "model": {"home_goals": m["prior"]["home"], "away_goals": m["prior"]["away"]},
                 "kickoff_ms": m["kickoff_us"] // 1000,
                 "rules": {k: m[k] for k in ("extra_time", "shootout") if k in m}}
        if "neutral" in m:
            event["neutral"] = m["neutral"]
    elif kind == "period_start":
        event = {"name": "PERIOD_START"}
    elif kind == "period_end":
        event = {"name": "PERIOD_END"}
    elif kind == "goal":
        event = {"name": "GOAL", "team": team(), **{k: m[k] for k in ("penalty", "own_goal") if k in m}}
    elif kind == "goal_cancelled":
        event = {"name": "GOAL_VOIDED", "voids_seq": m["goal_seq"]}
    elif kind == "red_card":
        event = {"name": "RED_CARD", "team": team(), **({"second_yellow": True} if m.get("second_yellow") else {})}
    elif kind == "card_rescinded":
        event = {"name": "CARD_REVOKED", "revokes_seq": m["card_seq"]}
    elif kind == "stoppage":
        event = {"name": "ADDED_TIME", "minutes": m["minutes"]}
    elif kind == "score_correction":
        event = {"name": "SCORE_FIX", "score": {"home": m["home_goals"], "away": m["away_goals"]}}
    elif kind == "shot_xg":
        event = {"name": "SHOT", "team": team(), "xg": m["xg"]}
    elif kind == "abandoned":
        event = {"name": "ABANDONED", "reason": m["reason"]}
    elif kind == "final_whistle":
        event = {"name": "FULL_TIME"}
    elif kind == "clock":
        event = {"name": "CLOCK"}
        if "running" in m:
            out["clock"]["running"] = m["running"]
    else:
        raise SystemExit(f"no harbour shape for {kind}")
    out["event"] = event
    return out


def meadow(m, ids, sides):
    kind = m["type"]
    out = {"game_ref": str(m["match"]), "n": m["seq"], "ts": m["time_us"] / 1e6,
           "half": PERIOD_CODES_MEADOW[m["period"]], "secs": clock_ms(m["clock"]) / 1000}
    flag = lambda key: 1 if m.get(key) else 0
    tid = lambda: ids[sides[m["match"]][m["side"]]]
    codes = {"setup": 1, "period_start": 2, "period_end": 3, "goal": 10, "goal_cancelled": 11,
             "red_card": 20, "card_rescinded": 21, "stoppage": 30, "score_correction": 40,
             "shot_xg": 50, "clock": 80, "abandoned": 90, "final_whistle": 99}
    out["code"] = codes[kind]
    if kind == "setup":
        out.update({"home_id": ids[m["home"]], "away_id": ids[m["away"]], "home": m["home"],
                    "away": m["away"], "xg_h": m["prior"]["home"], "xg_a": m["prior"]["away"],
                    "ko": m["kickoff_us"] / 1e6, "et": flag("extra_time"), "pens": flag("shootout")})
        if "neutral" in m:
            out["neutral"] = flag("neutral")
    elif kind in ("goal", "red_card", "shot_xg"):
        out["tid"] = tid()
        if kind == "goal":
            out.update({"pen": flag("penalty"), "og": flag("own_goal")})
        if kind == "red_card":
            out["y2"] = flag("second_yellow")
        if kind == "shot_xg":
            out["xg"] = m["xg"]
    elif kind == "goal_cancelled":
        out["ref"] = m["goal_seq"]
    elif kind == "card_rescinded":
        out["ref"] = m["card_seq"]
    elif kind == "stoppage":
        out["mins"] = m["minutes"]
    elif kind == "score_correction":
        out.update({"h": m["home_goals"], "a": m["away_goals"]})
    elif kind == "abandoned":
        out["why"] = m["reason"]
    elif kind == "clock":
        out["run"] = 0 if m.get("running") is False else 1
    return out


def main():
    root, out_dir = pathlib.Path(sys.argv[1]), pathlib.Path(sys.argv[2])
    matches = pick_matches(root)
    ids = team_ids(matches)
    sides = {}
    native, harbour_lines, meadow_lines = [], [], []
    for lines in matches:
        for i, m in enumerate(lines):
            if m["type"] == "setup":
                sides[m["match"]] = {"home": m["home"], "away": m["away"]}
            native.append(json.dumps(m))
            harbour_lines.append(json.dumps(harbour(m, ids, sides), separators=(",", ":")))
            meadow_lines.append(json.dumps(meadow(m, ids, sides), separators=(",", ":")))
            if i == 1:  # each provider's keep-alive, which the rules skip
                harbour_lines.append(json.dumps({"fixture": {"id": m["match"]}, "event": {"name": "HEARTBEAT"}}))
                meadow_lines.append(json.dumps({"game_ref": str(m["match"]), "code": 0}))
    (out_dir / "native.sample.jsonl").write_text("\n".join(native) + "\n")
    (out_dir / "harbour.sample.jsonl").write_text("\n".join(harbour_lines) + "\n")
    (out_dir / "meadow.sample.jsonl").write_text("\n".join(meadow_lines) + "\n")
    print(f"{len(matches)} matches, {len(native)} messages: "
          + ", ".join(str(lines[0]["match"]) for lines in matches))


if __name__ == "__main__":
    main()
