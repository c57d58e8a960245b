"""Pricing a position and driving a match: the engine's outputs as a `Prices` object."""
from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any, Dict, NamedTuple, Optional, Tuple, Union

from . import _native
from ._tables import as_array

#: Period names by the engine's number (0 = pre_match ... 6 = finished).
PERIODS = ("pre_match", "first_half", "second_half", "extra_first", "extra_second", "shootout",
           "finished")

Minute = Union[float, int, str]


@dataclass(frozen=True)
class Prices:
    """Every output of the engine at one moment of a match.

    ``home``, ``draw``, ``away``: probabilities of the full-time (regulation) result; they sum
    to 1. ``grid[i, j]``: probability that the home side adds ``i`` and the away side ``j`` goals
    from now to full time (a 16 x 16 table: a NumPy array, or without NumPy a read-only
    memoryview with ``shape``, ``grid[i, j]`` and ``tolist()``; ``tail_mass`` is what lies beyond
    it), so the final score is ``(score[0] + i, score[1] + j)``. ``over[k]``: P(total goals >
    k + 0.5), a table of 6 likewise.
    ``advance_home`` / ``advance_away``: to go through, where the format needs a winner
    (``has_advance``), else 0.
    """

    status: str
    period: str
    minute: float
    score: Tuple[int, int]
    reds: Tuple[int, int]
    home: float
    draw: float
    away: float
    has_advance: bool
    advance_home: float
    advance_away: float
    expected_home_goals: float
    expected_away_goals: float
    next_goal_home: float
    next_goal_away: float
    next_goal_none: float
    over: Any  # numpy.ndarray (or memoryview without NumPy), shape (6,)
    both_score: float
    grid: Any  # numpy.ndarray (or memoryview without NumPy), shape (16, 16)
    tail_mass: float
    events_applied: int

    @classmethod
    def _from_native(cls, d: Dict[str, Any]) -> "Prices":
        fields = dict(d)
        fields["period"] = PERIODS[fields["period"]]
        fields["minute"] = fields.pop("clock_ms") / 60000.0
        fields["score"] = tuple(fields["score"])
        fields["reds"] = tuple(fields["reds"])
        fields["over"] = as_array(fields["over"])
        fields["grid"] = as_array(fields["grid"])
        return cls(**fields)

    def final_score(self, home: int, away: int) -> float:
        """P(the final regulation score is home-away)."""
        i, j = home - self.score[0], away - self.score[1]
        if i < 0 or j < 0 or i >= self.grid.shape[0] or j >= self.grid.shape[1]:
            return 0.0
        return float(self.grid[i, j])


def clock_of(minute: Minute, knockout: bool = False, half_minutes: int = 45,
             extra_half_minutes: int = 15) -> Tuple[int, int]:
    """The engine's clock (period number, running clock in ms) for a match minute.

    ``minute``: a number on the running clock (67, 67.5), or a string ``"END+S"`` for stoppage
    time at the end of a half (``"45+2"``, ``"90+4"``; in a knock-out also ``"105+1"``,
    ``"120+2"``). Before ``half_minutes`` it is the first half, then the second half up to its
    end (and stoppage beyond it), then extra time in a knock-out format.
    """
    half, extra = float(half_minutes), float(extra_half_minutes)
    ends = [(half, 1), (2 * half, 2), (2 * half + extra, 3), (2 * half + 2 * extra, 4)]

    def at(period: int, m: float) -> Tuple[int, int]:
        return period, int(round(m * 60000.0))

    if isinstance(minute, str) and "+" in minute:
        base_text, added_text = minute.split("+", 1)
        base, added = float(base_text), float(added_text)
        if not 0.0 <= added <= 30.0:
            raise ValueError("stoppage minutes must be 0..30")
        for end, period in ends:
            if base == end and (knockout or period <= 2):
                return at(period, base + added)
        raise ValueError(f"'{base_text}+' names no end of a half in this format")
    m = float(minute)
    if not math.isfinite(m) or m < 0.0:
        raise ValueError("minute must be >= 0")
    if m < half:
        return at(1, m)
    if m <= 2 * half or not knockout:
        if m > 2 * half + 30.0:
            raise ValueError("minute is beyond the end of the match")
        return at(2, m)
    if m < 2 * half + extra:
        return at(3, m)
    if m <= 2 * half + 2 * extra:
        return at(4, m)
    raise ValueError("minute is beyond the end of extra time (use '120+S' for its stoppage)")


def price(prior: Tuple[float, float], minute: Minute = 0, score: Tuple[int, int] = (0, 0),
          reds: Tuple[int, int] = (0, 0), stoppage: Optional[int] = None,
          knockout: bool = False, params_file: Optional[str] = None,
          kappa: Optional[float] = None, plain_poisson: bool = False) -> Prices:
    """Price one match position, as ``liveprob calc`` does.

    ``prior``: expected regulation goals (home, away). ``minute``: see `clock_of`. ``score``
    and ``reds``: so far (in extra time, ``score`` is the regulation score). ``stoppage``:
    minutes announced for the current half. ``knockout``: extra time then a shoot-out when
    level. ``params_file``: a model parameter file (defaults built in); ``kappa``: override
    the strength-update concentration (``math.inf``: no updating); ``plain_poisson``: every
    score-state and red-card effect off and no updating, so the goals to come are independent
    Poisson (the model's reference case). Raises ValueError for an impossible position.
    """
    period, clock_ms = clock_of(minute, knockout)
    return Prices._from_native(_native.price(
        float(prior[0]), float(prior[1]), period, clock_ms, (int(score[0]), int(score[1])),
        (int(reds[0]), int(reds[1])), stoppage, knockout, knockout, params_file, kappa,
        plain_poisson))


class Verdict(NamedTuple):
    """What the match made of one event: ``verdict`` is accepted, late, duplicate or rejected;
    ``reason`` says why when rejected; ``seq`` is the event's sequence number."""

    verdict: str
    reason: str
    seq: int


# The period an event belongs to when the caller names none: a period start opens the next
# period; anything else happens in the current one.
_NEXT_PERIOD = {0: 1, 1: 2, 2: 3, 3: 4, 4: 5}


class Match:
    """One match driven event by event, as the live service drives it.

    ``prior``: expected regulation goals (home, away). ``knockout``: extra time then a
    shoot-out when level; ``first_leg``: (home, away) first-leg goals of THIS match's sides for a
    second leg (a winner is then needed on aggregate). ``params_file``, ``kappa``,
    ``plain_poisson``: the model's parameters, as for `price`.

    Events (``event(kind, minute, **fields)``), their fields:
    ``period_start``/``period_end`` (``period``: a name from PERIODS; default the next / the
    current one), ``goal`` (``side`` "home"/"away", ``penalty``, ``own_goal``),
    ``goal_cancelled`` (``goal_seq``), ``red_card`` (``side``, ``second_yellow``),
    ``card_rescinded`` (``card_seq``), ``stoppage`` (``minutes``), ``score_correction``
    (``home_goals``, ``away_goals``), ``shootout_kick`` (``side``, ``scored``), ``shot_xg``
    (``side``, ``xg``), ``abandoned``, ``final_whistle``, ``clock`` (``running``).
    Sequence numbers count up from 1 unless ``seq=`` is given (a repeated one is a duplicate).
    """

    def __init__(self, prior: Tuple[float, float], match_id: int = 1, knockout: bool = False,
                 first_leg: Optional[Tuple[int, int]] = None,
                 params_file: Optional[str] = None, kappa: Optional[float] = None,
                 plain_poisson: bool = False) -> None:
        self._knockout = knockout
        self._next_seq = 1
        self._native = _native.Match(match_id, float(prior[0]), float(prior[1]), knockout,
                                     knockout, first_leg, params_file, kappa, plain_poisson)

    def _current_period(self) -> int:
        return int(self._native.outputs()["period"])

    def event(self, kind: str, minute: Minute, *, period: Optional[str] = None,
              seq: Optional[int] = None, **fields: Any) -> Verdict:
        """Apply one event at ``minute`` (see `clock_of`); returns its `Verdict`."""
        if period is not None:
            number = PERIODS.index(period)
        elif kind == "period_start":
            number = _NEXT_PERIOD.get(self._current_period(), self._current_period())
        else:
            current = self._current_period()
            number = current if 1 <= current <= 5 else clock_of(minute, self._knockout)[0]
        if kind in ("period_start", "period_end", "stoppage"):
            fields["period"] = number
        clock_ms = int(round(_minute_number(minute) * 60000.0))
        if seq is None:
            seq = self._next_seq
        self._next_seq = max(self._next_seq, seq + 1)
        verdict, reason = self._native.apply(kind, seq, number, clock_ms, fields)
        return Verdict(verdict, reason, seq)

    def advance(self, minute: Minute) -> bool:
        """Run the clock to ``minute`` in the current period; False when it cannot move there
        (not in play, clock stopped, or earlier than the last reading)."""
        clock_ms = int(round(_minute_number(minute) * 60000.0))
        return bool(self._native.advance(self._current_period(), clock_ms))

    @property
    def prices(self) -> Prices:
        """The outputs at the current clock."""
        return Prices._from_native(self._native.outputs())


def _minute_number(minute: Minute) -> float:
    if isinstance(minute, str):
        if "+" in minute:
            base, added = minute.split("+", 1)
            return float(base) + float(added)
        return float(minute)
    return float(minute)
