"""Replaying recorded streams through the engine in process (as ``liveprob backtest``)."""
from __future__ import annotations

import os
from typing import Any, Dict, Iterable, Optional, Union

from . import _native

PathLike = Union[str, "os.PathLike[str]"]


def _frame(columns: Dict[str, Any], frame: Optional[bool]) -> Any:
    """A pandas DataFrame of ``columns`` when pandas is there (or asked for), else the dict."""
    if frame is False:
        return columns
    try:
        import pandas
    except ImportError:
        if frame:
            raise
        return columns
    return pandas.DataFrame(columns)


class ReplayResult:
    """What a replay found.

    ``forecasts``: NumPy array (matches, buckets, forecasters, 3) of home/draw/away forecasts at
    each bucket minute (NaN where the match never reached it). ``bucket_minute``,
    ``bucket_label``, ``forecaster``: the axes. ``per_match()`` and ``per_bucket()``: tables
    (a pandas DataFrame when pandas is installed, else a dict of arrays).
    """

    def __init__(self, native: Dict[str, Any]) -> None:
        self._d = native
        self.forecasts = native["forecasts"]
        self.bucket_minute = native["bucket_minute"]
        self.bucket_label = list(native["bucket_label"])
        self.forecaster = list(native["forecaster"])
        #: frames or lines of the streams that were refused (counted, skipped)
        self.bad_records = int(native["bad_records"])

    def __len__(self) -> int:
        return len(self._d["match_id"])

    def per_match(self, frame: Optional[bool] = None) -> Any:
        """One row per match: id, fate (scored/abandoned/unfinished/unusable), regulation
        result and goals, messages, rejected; plus the model's kick-off forecast."""
        import numpy
        d = self._d
        columns = {
            "match_id": d["match_id"], "fate": numpy.array(d["fate"]),
            "result": numpy.array(d["result"]), "home_goals": d["home_goals"],
            "away_goals": d["away_goals"], "messages": d["messages"],
            "rejected": d["rejected"],
            "kickoff_home": self.forecasts[:, 0, 0, 0], "kickoff_draw": self.forecasts[:, 0, 0, 1],
            "kickoff_away": self.forecasts[:, 0, 0, 2],
        }
        return _frame(columns, frame)

    def per_bucket(self, frame: Optional[bool] = None) -> Any:
        """One row per bucket and forecaster: minute, label, forecaster, n and the mean Brier
        score, log loss and ranked probability score of the scored matches."""
        import numpy
        d = self._d
        buckets, forecasters = d["brier"].shape
        columns = {
            "minute": numpy.repeat(self.bucket_minute, forecasters),
            "label": numpy.repeat(numpy.array(self.bucket_label), forecasters),
            "forecaster": numpy.tile(numpy.array(self.forecaster), buckets),
            "n": d["count"].reshape(-1), "brier": d["brier"].reshape(-1),
            "log_loss": d["log_loss"].reshape(-1), "rps": d["rps"].reshape(-1),
        }
        return _frame(columns, frame)


def replay(paths: Union[PathLike, Iterable[PathLike]], threads: int = 1,
           params_file: Optional[str] = None, kappa: Optional[float] = None,
           plain_poisson: bool = False) -> ReplayResult:
    """Replay recorded streams (files, or folders of them) through the engine and
    score each forecaster by bucket minute (the model's parameters as for `price`; ``threads``
    replays matches in parallel, same results). A bad record is counted and skipped."""
    if isinstance(paths, (str, os.PathLike)):
        paths = [paths]
    files = []
    for path in paths:  # as `liveprob replay`: a folder's files, recursively, sorted
        path = os.fspath(path)
        if os.path.isdir(path):
            files += sorted(os.path.join(top, name) for top, _, names in os.walk(path)
                            for name in names)
        elif os.path.exists(path):
            files.append(path)
        else:
            raise FileNotFoundError(f"no such stream file or folder: {path}")
    if not files:
        raise ValueError("no stream files given")
    return ReplayResult(_native.replay(files, threads, params_file, kappa, plain_poisson))
