#!/usr/bin/python3
"""Notebook-style example: an invented match priced minute by minute, plotted to a PNG.

Run from a build (the package is assembled in <build>/python) or after `pip install tools/python`:

    PYTHONPATH=build/release/python /usr/bin/python3 tools/examples/price_minute_by_minute.py \\
        --out timeline.png

The teams and events are invented. The figures are model estimates, not facts or advice.
"""
# %% Setup: the match, its prior and what happens in it (all invented).
import argparse

import matplotlib

matplotlib.use("Agg")  # files only: no display needed
import matplotlib.pyplot as plt  # noqa: E402

import liveprob  # noqa: E402

HOME, AWAY = "Harbour Rovers", "Millbrook Athletic"
PRIOR = (1.45, 1.05)  # expected regulation goals, home and away
EVENTS = {  # minute -> (kind, fields)
    12: ("goal", {"side": "away"}),
    38: ("red_card", {"side": "away"}),
    61: ("goal", {"side": "home"}),
    84: ("goal", {"side": "home", "penalty": True}),
}


def price_match():
    """Minute, home, draw, away after each minute of play (and after each event)."""
    match = liveprob.Match(prior=PRIOR)
    rows = []

    def record(minute):
        p = match.prices
        rows.append((minute, p.home, p.draw, p.away))

    match.event("period_start", 0)
    record(0)
    for minute in range(1, 96):
        if minute == 46:  # half-time at 45+1, the second half restarts at 45:00
            match.event("period_end", "45+1")
            match.event("period_start", 45)
        if minute in EVENTS:
            kind, fields = EVENTS[minute]
            match.event(kind, minute, **fields)
        else:
            match.advance(minute)
        record(minute)
    match.event("final_whistle", "90+5")
    record(95)
    return rows


# %% Price, then plot the three probabilities against the clock.
def plot(rows, out):
    minutes = [r[0] for r in rows]
    fig, ax = plt.subplots(figsize=(9, 4.5), dpi=110)
    ax.stackplot(minutes, [r[1] for r in rows], [r[2] for r in rows], [r[3] for r in rows],
                 labels=[HOME, "draw", AWAY], colors=["#2f6f9f", "#b8b8b8", "#c2703d"],
                 alpha=0.9)
    for minute, (kind, fields) in EVENTS.items():
        ax.axvline(minute, color="black", lw=0.8, ls=":")
        ax.text(minute, 1.01, f"{kind.replace('_', ' ')} ({fields['side']})", rotation=90,
                fontsize=7, va="bottom", ha="center")
    ax.set_xlim(0, 95)
    ax.set_ylim(0, 1)
    ax.set_xlabel("minute")
    ax.set_ylabel("probability of the full-time result (estimate)")
    ax.set_title(f"{HOME} v {AWAY}: invented match", pad=70)
    ax.legend(loc="lower left", fontsize=8)
    fig.tight_layout()
    fig.savefig(out)
    plt.close(fig)


def main():
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--out", default="timeline.png", help="PNG file to write")
    args = parser.parse_args()
    rows = price_match()
    plot(rows, args.out)
    last = rows[-1]
    print(f"{len(rows)} prices; final: home {last[1]:.3f} draw {last[2]:.3f} away {last[3]:.3f};"
          f" chart: {args.out}")


if __name__ == "__main__":
    main()
