"""Reading the machine-readable replay report (``report.json`` of ``liveprob backtest`` and
``liveprob replay``)."""
from __future__ import annotations

import json
import os
from typing import Any, Dict, List, Optional, Union

from .replay import _frame

REPORT_KIND = "liveprob-replay-report"
REPORT_VERSION = 1


class Report:
    """A replay report: ``matches`` and ``messages`` (counts), ``forecasters`` (names),
    ``raw`` (the whole JSON object) and ``scores()`` (one row per bucket and forecaster)."""

    def __init__(self, raw: Dict[str, Any]) -> None:
        if raw.get("kind") != REPORT_KIND:
            raise ValueError(f"not a liveprob replay report (kind {raw.get('kind')!r})")
        if raw.get("version") != REPORT_VERSION:
            raise ValueError(f"report version {raw.get('version')!r}, this module reads "
                             f"{REPORT_VERSION}")
        self.raw = raw
        self.matches: Dict[str, int] = raw["matches"]
        self.messages: Dict[str, int] = raw["messages"]
        self.forecasters: List[str] = raw["forecasters"]

    def scores(self, frame: Optional[bool] = None) -> Any:
        """Columns minute, label, forecaster, n, brier, log_loss, rps, ece (a DataFrame when
        pandas is installed, else a dict of lists)."""
        columns: Dict[str, list] = {k: [] for k in ("minute", "label", "forecaster", "n", "brier",
                                                    "log_loss", "rps", "ece")}
        for bucket in self.raw["buckets"]:
            for name in self.forecasters:
                s = bucket[name]
                columns["minute"].append(bucket["minute"])
                columns["label"].append(bucket["label"])
                columns["forecaster"].append(name)
                for key in ("n", "brier", "log_loss", "rps", "ece"):
                    columns[key].append(s[key])
        return _frame(columns, frame)


def read_report(path: Union[str, "os.PathLike[str]"]) -> Report:
    """Read ``report.json`` (or the folder holding it)."""
    path = os.fspath(path)
    if os.path.isdir(path):
        path = os.path.join(path, "report.json")
    with open(path, encoding="utf-8") as f:
        return Report(json.load(f))
