"""Numbers of the JSON as whole columns: the same values as Python's ``round`` per value.

``round(x, d)`` rounds the exact binary value of ``x`` half to even and returns the double
nearest that decimal. ``rint(x * 10**d) / 10**d`` gives the same double whenever the product
``x * 10**d`` is not within its own rounding error of a half (the division of two exact
doubles is correctly rounded); the few values that are that close (0.125 to 2 decimals,
1.00005 to 4) are rounded by Python one by one. Non-finite values become None (JSON null).
"""

from __future__ import annotations

from typing import Any

import numpy as np
import numpy.typing as npt

_NEAR_HALF = 1e-12
"""How close (relative to the scaled value, plus this much) to a half counts as a tie
that Python must settle; ten thousand times a double's rounding error (1.1e-16)."""
_EXACT_LIMIT = 2.0**50
"""Scaled values beyond this are left to Python (rint must give an exact integer)."""


def num_column(values: npt.ArrayLike, digits: int = 4) -> list[Any]:
    """``[round(float(x), digits) if finite else None for x in values]``, any shape (nested
    lists for 2-D)."""
    x = np.asarray(values, dtype=np.float64)
    if x.ndim == 0:
        raise ValueError("num_column takes an array of at least one dimension")
    scale = 10.0**digits
    with np.errstate(all="ignore"):
        t = x * scale
        y = np.rint(t) / scale
        off_half = np.abs(np.abs(t - np.floor(t)) - 0.5)
        slow = ~(off_half > _NEAR_HALF * (1.0 + np.abs(t))) | ~(np.abs(t) < _EXACT_LIMIT)
    finite = np.isfinite(x)
    out = y.tolist()
    _patch(out, np.argwhere(slow & finite), lambda v: round(v, digits), x)
    _patch(out, np.argwhere(~finite), lambda v: None, x)
    return out


def cdr_column(values: npt.ArrayLike, digits: int = 3) -> list[Any]:
    """``[cdr_cut(x, digits) if finite else None for x in values]``: the same float
    operations as :func:`screening.engine.result.cdr_cut`, element by element."""
    x = np.asarray(values, dtype=np.float64)
    if x.ndim == 0:
        raise ValueError("cdr_column takes an array of at least one dimension")
    scale = float(10**digits)
    with np.errstate(all="ignore"):
        y = np.floor(x * scale + 1e-9) / scale
    out = y.tolist()
    _patch(out, np.argwhere(~np.isfinite(x)), lambda v: None, x)
    return out


def _patch(out: list[Any], where: np.ndarray, fn, x: np.ndarray) -> None:
    """Replace the items of ``out`` (nested lists of ``x``'s shape) at ``where``."""
    for index in where.tolist():
        row = out
        for k in index[:-1]:
            row = row[k]
        row[index[-1]] = fn(float(x[tuple(index)]))
