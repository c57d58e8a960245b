# The package's public names (they load lazily: __init__.py).
from ._version import __version__ as __version__
from .pricing import PERIODS as PERIODS, Match as Match, Prices as Prices, Verdict as Verdict
from .pricing import clock_of as clock_of, price as price
from .replay import ReplayResult as ReplayResult, replay as replay
from .report import Report as Report, read_report as read_report
from .subscribe import Subscription as Subscription, subscribe as subscribe
