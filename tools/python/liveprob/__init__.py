"""liveprob for Python: the live football win/draw/loss engine in a notebook.

Price a position, drive a match event by event, replay recorded streams, read a replay report,
follow a live service::

    import liveprob
    p = liveprob.price(prior=(1.45, 1.05), minute=0, score=(0, 0))
    p.home, p.draw, p.away          # full-time result probabilities
    p.grid                          # P(home adds i, away adds j goals): a NumPy array
                                    # (a memoryview where NumPy is not installed)

    m = liveprob.Match(prior=(1.45, 1.05))
    m.event("period_start", minute=0)
    m.event("goal", minute=23, side="away")
    m.advance(minute=40)
    m.prices.away

Every figure is a model estimate, not a fact and not advice (see the project's README,
"Caution"). The engine is the very code the program and the live service run: a position priced
here equals ``liveprob calc``, a replay equals ``liveprob backtest``.
"""
from importlib import import_module
from typing import Any

from ._version import __version__

# Names load their module on first use (PEP 562), so `python3 -m liveprob.subscribe` needs no
# NumPy (it uses the compiled module's update reader only). NumPy is optional everywhere
# (liveprob/_tables.py).
_WHERE = {
    "PERIODS": "pricing", "Match": "pricing", "Prices": "pricing", "Verdict": "pricing",
    "clock_of": "pricing", "price": "pricing", "ReplayResult": "replay", "replay": "replay",
    "Report": "report", "read_report": "report", "Subscription": "subscribe",
    "subscribe": "subscribe",
}

__all__ = ["__version__", *_WHERE]


def __getattr__(name: str) -> Any:
    if name in _WHERE:
        value = getattr(import_module("." + _WHERE[name], __name__), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'liveprob' has no attribute {name!r}")


def __dir__() -> list:
    return sorted(__all__)
