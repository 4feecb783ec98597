"""Shortest reinforcement length that passes every length-dependent check (METHOD section 7).

L = max(L_rule, shortest L passing sliding, eccentricity, bearing, pullout and any added
check that sizes the length), on the 0.1 m step, searched up to max_screen_length_ratio*H.

The search is a bisection on the step index, vectorised over segments: every segment keeps
its own bracket [lo, hi] with "fails at lo, passes at hi", and each round evaluates all
segments at their midpoints in one numpy pass. A segment that passes at L_rule stops there;
one that still fails at the longest length is reported at that length (and referred). The
checks grow with L in every case screening admits (more weight, longer anchorage, wider
base), which is what makes bisection exact on the step grid; about log2((1.2-0.7)H/0.1)
rounds, 7 for a 15 m wall.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from screening.engine.checks import external, internal
from screening.engine.context import (
    CheckValues,
    ExtraCheck,
    Grades,
    InternalSetup,
    ScreenContext,
    take_rows,
)
from screening.engine.result import BoolArray, FloatArray, IntArray

PASS_TOL = 1e-9


@dataclass(frozen=True)
class Sizing:
    length_m: FloatArray
    """Chosen L, on the step grid, (n,)."""
    exhausted: BoolArray
    """True where no length up to the longest tried passes every sizing check."""
    steps: IntArray
    """Steps of length_step_m above the rule length, (n,)."""


def sizing_cdr(
    ctx: ScreenContext, s: InternalSetup, extras: Sequence[ExtraCheck], length_m: FloatArray
) -> FloatArray:
    """Smallest CDR over the checks that size L, at L (n,)."""
    cdr = external.external_cdr(ctx, length_m)
    cdr = np.minimum(cdr, internal.pullout(ctx, s, length_m, detail=False).cdr)
    for check in extras:
        if check.sizes_length:
            cdr = np.minimum(cdr, check.values(ctx, length_m).cdr)
    return cdr


def size_length(ctx: ScreenContext, s: InternalSetup, extras: Sequence[ExtraCheck] = ()) -> Sizing:
    """Shortest passing L per segment: the built-in checks first, then any added checks.

    Added checks (a slip-circle search is costly) are evaluated once over all segments at
    the length the built-in checks need, and searched further only on the segments they
    fail there: a second bisection from that length, on those rows alone.
    """
    sizing_extras = [c for c in extras if c.sizes_length]
    core = _bisect(ctx, s, (), np.zeros(ctx.n, dtype=np.int64))
    if not sizing_extras or ctx.n == 0:
        return core
    ok = np.ones(ctx.n, dtype=bool)
    for check in sizing_extras:
        ok &= check.values(ctx, core.length_m).cdr >= 1.0 - PASS_TOL
    rows = np.flatnonzero(~ok & ~core.exhausted)
    if rows.size == 0:
        return core
    sub_ctx = ctx.take(rows)
    sub_s = take_rows(s, rows, ctx.n)
    more = _bisect(sub_ctx, sub_s, sizing_extras, core.steps[rows])
    length, exhausted, steps = core.length_m.copy(), core.exhausted.copy(), core.steps.copy()
    length[rows], exhausted[rows], steps[rows] = more.length_m, more.exhausted, more.steps
    return Sizing(length, exhausted, steps)


def _bisect(
    ctx: ScreenContext, s: InternalSetup, extras: Sequence[ExtraCheck], start: IntArray
) -> Sizing:
    """Vectorised bisection on the step index, from ``start`` steps above the rule length."""
    g = ctx.geom
    step = ctx.a.rules.length_step_m
    top = np.maximum(np.round((g.max_length_m - g.rule_length_m) / step), 0).astype(np.int64)

    def length_at(j: IntArray) -> FloatArray:
        return np.round(g.rule_length_m + j * step, 10)

    def passes(j: IntArray) -> BoolArray:
        return sizing_cdr(ctx, s, extras, length_at(j)) >= 1.0 - PASS_TOL

    lo = np.minimum(start, top).astype(np.int64)
    hi = top.copy()
    ok_lo = passes(lo)
    ok_hi = passes(hi)
    hi = np.where(ok_lo, lo, hi)
    active = ~ok_lo & ok_hi
    while True:
        active &= hi - lo > 1
        if not active.any():
            break
        mid = (lo + hi) // 2
        ok = passes(np.where(active, mid, hi))
        hi = np.where(active & ok, mid, hi)
        lo = np.where(active & ~ok, mid, lo)
    exhausted = ~ok_lo & ~ok_hi
    return Sizing(length_at(hi), exhausted, hi)


def evaluate(
    ctx: ScreenContext, s: InternalSetup, extras: Sequence[ExtraCheck], length_m: FloatArray
) -> tuple[dict[str, CheckValues], Grades]:
    """Every check at L with its governing case, layer and words, and the grades chosen."""
    f = external.forces(ctx, length_m)
    grades = internal.choose_grades(ctx, s, length_m)
    out = {
        "sliding": external.sliding(ctx, length_m, f),
        "eccentricity": external.eccentricity(ctx, length_m, f),
        "bearing": external.bearing(ctx, length_m, f),
        "pullout": internal.pullout(ctx, s, length_m, grades),
        "rupture": internal.rupture(ctx, s, grades),
    }
    for check in extras:
        out[check.name] = check.values(ctx, length_m)
    return out, grades
