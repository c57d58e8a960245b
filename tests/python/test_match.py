"""liveprob.Match: a match driven event by event equals the C library's (the embedding example's
match, line by line), and reports duplicates and rejections as the engine does."""
import re
import subprocess

import pytest

import liveprob


LINE = re.compile(r"home ([0-9.]+)  draw ([0-9.]+)  away ([0-9.]+)  next-goal-none ([0-9.]+)$")


def parse_embed_c(text):
    """(what, home, draw, away, next-goal-none) per printed line of tools/examples/embed_c.c."""
    rows = []
    for line in text.splitlines():
        what = line[:28].strip()
        if "rejected:" in line:
            rows.append((what, "rejected", line.split("rejected: ")[1]))
            continue
        match = LINE.search(line)
        assert match, line
        rows.append((what, *map(float, match.groups())))
    return rows


def test_a_match_driven_from_python_equals_the_c_library(embed_c_binary):
    expected = parse_embed_c(subprocess.run([embed_c_binary], check=True, capture_output=True,
                                            text=True).stdout)
    m = liveprob.Match(prior=(1.55, 1.05), match_id=2024)
    got = []

    def show(what):
        p = m.prices
        got.append((what, p.home, p.draw, p.away, p.next_goal_none))

    def event(what, *args, **kwargs):
        v = m.event(*args, **kwargs)
        if v.verdict == "rejected":
            got.append((what, "rejected", v.reason))
        else:
            assert v.verdict == "accepted", v
            show(what)

    show("before kick-off")
    event("kick-off", "period_start", 0)
    event("away goal", "goal", 23, side="away")
    for minute in (30, 35, 40, 45):
        if m.advance(minute):
            show("clock runs")
    event("half-time", "period_end", 47)
    event("second half", "period_start", 45)
    event("away red card", "red_card", 60, side="away")
    event("home penalty goal", "goal", 78, side="home", penalty=True)
    for minute in (80, 85, 90):
        m.advance(minute)
        show("clock runs")
    event("a kick outside a shoot-out", "shootout_kick", 91, side="home")
    event("final whistle", "final_whistle", 95)
    assert len(got) == len(expected)
    for g, e in zip(got, expected):
        assert g[0] == e[0]
        if g[1] == "rejected":
            assert g == e
        else:  # embed_c prints 12 decimals
            assert g[1:] == pytest.approx(e[1:], abs=1e-12)


def test_duplicates_late_events_and_bad_events():
    m = liveprob.Match(prior=(1.3, 1.2))
    assert m.event("period_start", 0).verdict == "accepted"
    goal = m.event("goal", 20, side="home", seq=5)  # the feed skipped 2..4
    assert m.prices.score == (1, 0)
    assert m.event("goal", 20, side="home", seq=goal.seq).verdict == "duplicate"
    assert m.prices.score == (1, 0)
    assert m.event("goal_cancelled", 22, goal_seq=goal.seq).verdict == "accepted"
    assert m.prices.score == (0, 0)
    late = m.event("red_card", 10, side="away", seq=3)  # older than the newest (6)
    assert late.verdict == "late" and m.prices.reds == (0, 1)
    assert m.event("shootout_kick", 30, side="home").verdict == "rejected"
    with pytest.raises(ValueError, match="side"):
        m.event("goal", 31, side="middle")
    with pytest.raises(ValueError, match="kind"):
        m.event("corner", 31)
    assert m.prices.events_applied == 4


def test_a_knockout_match_gives_the_chance_to_advance():
    m = liveprob.Match(prior=(1.4, 1.4), knockout=True)
    m.event("period_start", 0)
    assert m.prices.has_advance
    assert m.prices.advance_home + m.prices.advance_away == pytest.approx(1.0, abs=1e-12)
    second_leg = liveprob.Match(prior=(1.4, 1.4), first_leg=(0, 2))
    second_leg.event("period_start", 0)
    assert second_leg.prices.advance_away > 0.7  # two goals up from the first leg
