"""Replaying recorded streams through the engine in process (as ``liveprob backtest``)."""
from __future__ import annotations

import os
from typing import Any, Dict, Iterable, Optional, Union

from . import _native
from ._tables import as_array, column, flat

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

    ``forecasts``: table (matches, buckets, forecasters, 3) of home/draw/away forecasts at
    each bucket minute (NaN where the match never reached it): a NumPy array, or a read-only
    memoryview where NumPy is not installed. ``bucket_minute``, ``bucket_label``,
    ``forecaster``: the axes. ``per_match()`` and ``per_bucket()``: tables (a pandas DataFrame
    when pandas is installed, else a dict of NumPy arrays, or of lists without NumPy).
    """

    def __init__(self, native: Dict[str, Any]) -> None:
        self._d = native
        self.forecasts = as_array(native["forecasts"])
        self.bucket_minute = column(native["bucket_minute"])
        self.bucket_label = list(native["bucket_label"])
        self.forecaster = list(native["forecaster"])
        #: frames or lines of the streams that were refused (counted, skipped)
        self.bad_records = int(native["bad_records"])

    def __len__(self) -> int:
        return len(memoryview(self._d["match_id"]))

    def per_match(self, frame: Optional[bool] = None) -> Any:
        """One row per match: id, fate (scored/abandoned/unfinished/unusable), regulation
        result and goals, messages, rejected; plus the model's kick-off forecast."""
        d = self._d
        kickoff = [row[0][0] for row in self.forecasts.tolist()]  # bucket 0, forecaster 0
        columns = {
            "match_id": column(d["match_id"]), "fate": column(d["fate"]),
            "result": column(d["result"]), "home_goals": column(d["home_goals"]),
            "away_goals": column(d["away_goals"]), "messages": column(d["messages"]),
            "rejected": column(d["rejected"]),
            "kickoff_home": column([f[0] for f in kickoff]),
            "kickoff_draw": column([f[1] for f in kickoff]),
            "kickoff_away": column([f[2] for f in kickoff]),
        }
        return _frame(columns, frame)

    def per_bucket(self, frame: Optional[bool] = None) -> Any:
        """One row per bucket and forecaster: minute, label, forecaster, n and the mean Brier
        score, log loss and ranked probability score of the scored matches."""
        d = self._d
        buckets, forecasters = memoryview(d["brier"]).shape
        columns = {
            "minute": column([m for m in self.bucket_minute for _ in range(forecasters)]),
            "label": column([b for b in self.bucket_label for _ in range(forecasters)]),
            "forecaster": column(self.forecaster * buckets),
            "n": column(flat(memoryview(d["count"]))), "brier": column(flat(memoryview(d["brier"]))),
            "log_loss": column(flat(memoryview(d["log_loss"]))),
            "rps": column(flat(memoryview(d["rps"]))),
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
