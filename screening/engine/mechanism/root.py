"""The root search on the strength factor: lambda(F) = 1 from a few LPs.

lambda(F), the load factor on the gravity loads with every strength divided by F, falls as F
grows. It is the least over mechanisms, each smooth, so it has kinks where another mechanism
takes over (always steeper: the new one falls below the old) and steps where lambda drops to
0 (c' = 0: a frictional mechanism that needs no dissipation once tan phi'/F is small enough).
Locally lambda ~ F^-k; every LP gives its own k (``solve._slope``, from the LP's sensitivity),
so a Newton step on log lambda against log F, F lambda^(1/k), points at the root of the
current mechanism. The search keeps a bracket once it has one and bisects where Newton and
the secant stall (a kink or a step inside the bracket).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from screening.model.errors import EngineError

F_MIN, F_MAX = 1.0 / 64.0, 64.0
LAMBDA_CAP = 1e3
"""lambda above this counts as 'no mechanism' in the root search on F."""
RTOL = 5e-3
"""Tolerance of F: the search stops at an LP whose Newton step to the root is at most this
share of F, and reports the root that step gives (a screening cross-check: 0.5 % is well
inside the grid's own bias; the Newton answer is usually far closer, bench item 4)."""
COARSE_RTOL = 1e-2
FIRST_SLOPE = 3.0
"""k = -d log lambda / d log F where no LP has given one yet (lambda 0 or infinite)."""
COLLAPSE_STEP = 1.1
"""Step down in F from a collapse (lambda = 0: no slope to go by) before the root is
bracketed; the start is usually within 10 % of the root (coarse grid or slip circles)."""
STEP_RTOL = 1e-2
"""Tolerance on F where lambda steps from above 1 to 0 (c' = 0: a frictional mechanism
starts to do work for nothing): bisection only narrows a step, so it stops at 1 % and
reports the stable end (the lower F)."""
SLOPE_RANGE = (0.5, 60.0)
"""k taken from an LP is kept in this range (a kink can be steep: k ~ 30 measured)."""
ACCEPT_SLOPE = 12.0
"""Largest k the stopping test trusts: with k above it, a point must be within
ACCEPT_SLOPE * rtol in log lambda to end the search (a kink can be close)."""
MAX_STEP = 1.6
"""Largest step of F (as a ratio) while the root is not yet bracketed."""
INNER = 0.05
"""A Newton or secant step inside a bracket must land this share (of log F) inside it."""
ROOT_STEPS = 40


@dataclass(frozen=True)
class Root:
    factor: float
    """F with lambda(F) = 1 (0: collapse even at F_MIN; inf: none up to F_MAX); with
    ``above``, only a lower bound."""
    at: float
    """The F of the last LP near the root (its mechanism is the one reported)."""
    slope: float
    above: bool = False
    """The search stopped because F is at least ``enough`` (:func:`find_root`)."""


def newton(point) -> float:
    """The root that the point's own slope points to (NaN without a slope)."""
    f, lam, k = point
    return f * lam ** (1.0 / k) if np.isfinite(k) else float("nan")


def find_root(run, f0: float, rtol: float, enough: float = np.inf) -> Root:
    """lambda(F) = 1 with ``run.point(F) -> (lambda, k)`` (one LP each).

    A point whose Newton step is at most ``rtol`` (k capped at ACCEPT_SLOPE) ends the search
    with that step's root. Until the root is bracketed the steps are Newton steps capped at
    MAX_STEP (COLLAPSE_STEP down from a collapse). Inside a bracket: the least of the Newton
    roots of its two ends that lands inside it (lambda is the least over mechanisms, so the
    least root is the one that holds), else the secant of log lambda, else the geometric
    midpoint; the midpoint too when two steps did not halve the bracket. A bracket narrowed
    to ``rtol`` (STEP_RTOL at a step to 0 or from infinity) reports its stable end.
    ``enough``: stop as soon as a stable point (lambda >= 1) has F >= enough (only whether F
    reaches it matters): ``Root.above``.
    """
    lo = hi = None  # (F, lambda, k) with lambda >= 1 (stable) / < 1 (collapses)
    slope = FIRST_SLOPE
    widths: list[float] = []
    f = float(np.clip(f0, F_MIN, F_MAX))
    for _ in range(ROOT_STEPS):
        lam, k = run.point(f)
        lam = min(lam, LAMBDA_CAP)
        smooth = 0.0 < lam < LAMBDA_CAP and np.isfinite(k)
        k = float(np.clip(k, *SLOPE_RANGE)) if smooth else float("nan")
        if smooth:
            slope = k
            if abs(np.log(lam)) <= min(k, ACCEPT_SLOPE) * rtol:
                return Root(f * lam ** (1.0 / k), f, k)
        here = (f, lam, k)
        if lam >= 1.0:
            lo = here if lo is None or f > lo[0] else lo
            if lo[0] >= enough:
                return Root(lo[0], lo[0], slope, above=True)
        else:
            hi = here if hi is None or f < hi[0] else hi
        if lo is not None and hi is not None:
            ratio = hi[0] / lo[0]
            edge = hi[1] == 0.0 or lo[1] >= LAMBDA_CAP
            if ratio - 1.0 <= (max(rtol, STEP_RTOL) if edge else rtol):
                return Root(lo[0], lo[0], slope)
            widths.append(float(np.log(ratio)))
            stalled = len(widths) >= 3 and widths[-1] > 0.5 * widths[-3]
            f = lo[0] * ratio**0.5 if stalled else _inside(lo, hi, ratio)
        elif lo is not None:
            if f >= F_MAX:
                return Root(np.inf, f, slope)
            step = newton(here) / f if smooth else MAX_STEP
            f = min(f * float(np.clip(step, 1.0, MAX_STEP)), F_MAX)
        else:
            if f <= F_MIN:
                return Root(0.0, f, slope)
            step = f / newton(here) if smooth else COLLAPSE_STEP
            f = max(f / float(np.clip(step, 1.0, MAX_STEP)), F_MIN)
    raise EngineError(
        f"mechanism check: the strength factor did not settle in {ROOT_STEPS} linear programmes"
    )


def _inside(lo, hi, ratio: float) -> float:
    """The next F inside a bracket (``find_root``)."""
    low, high = lo[0] * ratio**INNER, lo[0] * ratio ** (1.0 - INNER)
    guesses = [newton(end) for end in (lo, hi) if np.isfinite(end[2])]
    inside = [g for g in guesses if low <= g <= high]
    if inside:
        return min(inside)
    if hi[1] > 0.0 and lo[1] < LAMBDA_CAP:
        k = np.log(lo[1] / hi[1]) / np.log(ratio)
        t = float(np.clip(np.log(lo[1]) / k / np.log(ratio), INNER, 1 - INNER)) if k > 0 else 0.5
        return lo[0] * ratio**t
    return lo[0] * ratio**0.5
