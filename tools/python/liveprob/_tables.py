"""The engine's tables as NumPy arrays when NumPy is installed, else as read-only memoryviews.

The compiled engine hands out its numbers through the buffer protocol, so NumPy is optional: a
plain virtual environment (no system packages, no index to fetch NumPy from) still prices, drives
matches and replays. A memoryview has ``shape``, ``t[i, j]`` for one element and ``tolist()``;
NumPy wraps the same memory without a copy.
"""
from __future__ import annotations

from typing import Any, List, Optional


def numpy_module() -> Optional[Any]:
    """NumPy if it can be imported, else None."""
    try:
        import numpy
    except ImportError:
        return None
    return numpy


def as_array(table: Any) -> Any:
    """One table from the engine: a NumPy array, or a memoryview without NumPy."""
    numpy = numpy_module()
    return numpy.asarray(table) if numpy is not None else memoryview(table)


def column(values: Any) -> Any:
    """A table column: a NumPy array, or a plain list without NumPy."""
    numpy = numpy_module()
    if numpy is not None:
        return numpy.asarray(values)
    if isinstance(values, (list, tuple)):
        return list(values)
    return memoryview(values).tolist()  # a table from the engine, or a memoryview of one


def flat(table: Any) -> List[Any]:
    """A table's values in row-major order as a list (either kind of table)."""
    values = table.tolist()
    while values and isinstance(values[0], list):
        values = [v for row in values for v in row]
    return values
