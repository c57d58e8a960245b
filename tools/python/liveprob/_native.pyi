# Type stubs of the compiled engine (bindings/native_module.cpp). Use the liveprob package's
# functions, which name and document these values; this module's interface may change.
from typing import Any, Dict, List, Optional, Tuple

GRID: int

def price(home_goals: float, away_goals: float, period: int, clock_ms: int,
          score: Tuple[int, int], reds: Tuple[int, int], stoppage: Optional[int],
          extra_time: bool, shootout: bool, params_file: Optional[str],
          kappa: Optional[float], plain_poisson: bool) -> Dict[str, Any]: ...

class Match:
    def __init__(self, match_id: int, home_goals: float, away_goals: float, extra_time: bool,
                 shootout: bool, first_leg: Optional[Tuple[int, int]],
                 params_file: Optional[str], kappa: Optional[float],
                 plain_poisson: bool) -> None: ...
    def apply(self, kind: str, seq: int, period: int, clock_ms: int,
              fields: Dict[str, Any]) -> Tuple[str, str]: ...
    def advance(self, period: int, clock_ms: int) -> bool: ...
    def outputs(self) -> Dict[str, Any]: ...

def replay(paths: List[str], threads: int, params_file: Optional[str],
           kappa: Optional[float], plain_poisson: bool) -> Dict[str, Any]: ...
