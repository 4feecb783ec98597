"""Reinforcement that passes every check: length, then grade (METHOD section 7).

L = max(the detailing minimum, shortest L passing sliding, eccentricity, bearing, pullout and
every added check that sizes the length), on the 0.1 m step, searched up to
max_screen_length_ratio*H. The detailing minimum is the rule of thumb max(0.7H, 2.4 m) and
the anchorage rule Le >= 0.9 m in every layer [mem, AASHTO 11.10.2.1 and 11.10.6.3.2]:
rules met by construction, never reported as a margin.

The built-in checks grow with L (more weight, longer anchorage, wider base), so their
length is a vectorised bisection on the step index: every segment keeps a bracket
[lo, hi] with "fails at lo, passes at hi", about log2((1.2-0.7)H/0.1) rounds.

The added checks (slip circles, seismic) need not grow with L: the grade chosen at each L
is the lightest that passes internally, so a longer L can carry a lighter grade and a lower
compound factor. They are searched on the segments that fail them at the built-in length
only: a scan of a few lengths up to the longest, then a bisection inside the first bracket
that passes. Where no length passes and the failing check is one that stronger layers
help (compound, rupture, seismic), the grade of every layer is raised one step at a time
and the search repeated (:data:`GRADE_HELPED`); a closer spacing is the screen's next step
(engine/__init__.py).
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, replace

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
from screening.engine.geometry import ceil_step
from screening.engine.result import BoolArray, FloatArray, IntArray

PASS_TOL = 1e-9
SCAN_POINTS = 4
"""Lengths the scan tries between the built-in length and the longest (the last is the longest)."""
GRADE_HELPED = ("compound", "seismic", "rupture")
"""Checks that a stronger grade in every layer can make pass when no length does."""
RULE_OF_THUMB, ANCHORAGE_RULE, LONGEST = "rule of thumb", "anchorage rule", "longest screened"
"""What sets L when no check does (Sizing.set_by); LONGEST: nothing passes up to the longest."""


@dataclass(frozen=True)
class Sizing:
    length_m: FloatArray
    """Chosen L, on the step grid, (n,)."""
    exhausted: BoolArray
    """True where no length up to the longest tried passes every sizing check."""
    steps: IntArray
    """Steps of length_step_m above the rule length, (n,)."""
    set_by: list[str]
    """What set L: a check's name (the shortest length it passes), RULE_OF_THUMB,
    ANCHORAGE_RULE, or LONGEST where nothing passes (the failing checks say why)."""
    grade_boost: IntArray
    """Grade steps added to every layer above the lightest that passes internally, (n,)."""
    minimum_m: FloatArray
    """The detailing minimum: max(rule of thumb, the anchorage rule), (n,)."""


def anchorage_minimum_m(ctx: ScreenContext, s: InternalSetup) -> FloatArray:
    """Shortest L giving every layer Le >= Rules.min_anchorage_m beyond the line of maximum
    tension [mem, AASHTO 11.10.6.3.2: 3 ft], on the length step, (n,)."""
    need = np.where(s.mask, s.active_length + ctx.a.rules.min_anchorage_m, 0.0).max(axis=1)
    return ceil_step(need, ctx.a.rules.length_step_m)


def sizing_values(
    ctx: ScreenContext, s: InternalSetup, extras: Sequence[ExtraCheck], length_m: FloatArray
) -> tuple[FloatArray, np.ndarray]:
    """Smallest CDR over the checks that size L at L, and the name of that check, (n,) each."""
    cdr, which = external.external_values(ctx, length_m)
    checks = [("pullout", internal.pullout(ctx, s, length_m, detail=False).cdr)]
    checks += [(c.name, c.values(ctx, length_m, words=False).cdr) for c in extras if c.sizes_length]
    for name, value in checks:
        lower = value < cdr
        cdr = np.where(lower, value, cdr)
        which = np.where(lower, name, which)
    return cdr, which


def sizing_cdr(
    ctx: ScreenContext, s: InternalSetup, extras: Sequence[ExtraCheck], length_m: FloatArray
) -> FloatArray:
    """Smallest CDR over the checks that size L, at L (n,)."""
    return sizing_values(ctx, s, extras, length_m)[0]


def size_length(ctx: ScreenContext, s: InternalSetup, extras: Sequence[ExtraCheck] = ()) -> Sizing:
    """Length (and grade) per segment: the built-in checks first, then the added checks on
    the segments they fail, then heavier grades where no length passes (module docstring)."""
    g = ctx.geom
    step = ctx.a.rules.length_step_m
    minimum = np.maximum(g.rule_length_m, anchorage_minimum_m(ctx, s))
    start = np.round((minimum - g.rule_length_m) / step).astype(np.int64)
    top = _top(ctx)
    start = np.minimum(start, top)
    ok0, name0 = _passes(ctx, s, (), _length_at(ctx, start))
    core_steps, core_exhausted, core_set = _bisect(ctx, s, (), start, top, ok0, name0)
    boost = np.zeros(ctx.n, dtype=np.int64)
    set_by = np.where(start > 0, ANCHORAGE_RULE, RULE_OF_THUMB).astype(object)
    set_by = np.where(core_steps > start, core_set, set_by)
    set_by = np.where(core_exhausted, core_set, set_by)
    steps, exhausted = core_steps.copy(), core_exhausted.copy()
    sizing_extras = [c for c in extras if c.sizes_length]
    if sizing_extras and ctx.n:
        ok = np.ones(ctx.n, dtype=bool)
        for check in sizing_extras:
            cdr = check.values(ctx, _length_at(ctx, core_steps), words=False).cdr
            ok &= cdr >= 1.0 - PASS_TOL
        rows = np.flatnonzero(~ok & ~core_exhausted)
        if rows.size:
            sub = _scan(ctx, s, sizing_extras, rows, core_steps[rows], top[rows])
            steps[rows], exhausted[rows], set_by[rows] = sub
            stuck = rows[exhausted[rows]]
            stuck = stuck[np.isin(set_by[stuck], GRADE_HELPED) & (ctx.a.grade_count[stuck] > 1)]
            stuck = _hopeful(ctx, s, sizing_extras, stuck, core_steps, top)
            for level in range(1, int(ctx.a.grade_count.max(initial=1))):
                stuck = stuck[ctx.a.grade_count[stuck] > level]
                if stuck.size == 0:
                    break
                boosted = _with_boost(ctx, stuck, level)
                b_steps, b_exhausted, b_set = _scan(
                    boosted, s, sizing_extras, stuck, core_steps[stuck], top[stuck]
                )
                won = ~b_exhausted
                done = stuck[won]
                steps[done], exhausted[done], set_by[done] = b_steps[won], False, b_set[won]
                boost[done] = level
                stuck = stuck[~won]
    set_by = np.where(exhausted, LONGEST, set_by)
    return Sizing(
        length_m=_length_at(ctx, steps),
        exhausted=exhausted,
        steps=steps,
        set_by=set_by.tolist(),
        grade_boost=boost,
        minimum_m=minimum,
    )


def _hopeful(ctx, s, extras, stuck, core_steps, top) -> IntArray:
    """The rows of ``stuck`` that pass somewhere in the scan with the heaviest grade in every
    layer. No check's CDR falls as the grade rises (the rupture and compound capacities
    grow with it, the others do not depend on it), so a row failing every scan length at
    its heaviest grade fails them at each lighter one too, and the grade-by-grade scans of
    :func:`size_length` are for the others only (it was most of a screen's slip searches
    where many segments cannot pass: every grade was scanned at every length)."""
    if stuck.size == 0:
        return stuck
    heaviest = _with_boost(ctx, stuck, ctx.a.grade_count[stuck] - 1)
    _, exhausted, _ = _scan(heaviest, s, extras, stuck, core_steps[stuck], top[stuck])
    return stuck[~exhausted]


def _top(ctx: ScreenContext) -> IntArray:
    g = ctx.geom
    step = ctx.a.rules.length_step_m
    return np.maximum(np.round((g.max_length_m - g.rule_length_m) / step), 0).astype(np.int64)


def _length_at(ctx: ScreenContext, j: IntArray) -> FloatArray:
    return np.round(ctx.geom.rule_length_m + j * ctx.a.rules.length_step_m, 10)


def _passes(ctx, s, extras, length_m) -> tuple[BoolArray, np.ndarray]:
    cdr, name = sizing_values(ctx, s, extras, length_m)
    return cdr >= 1.0 - PASS_TOL, name


def _with_boost(ctx: ScreenContext, rows: IntArray, level) -> ScreenContext:
    """The context of ``rows`` with every layer ``level`` (one for all, or one per row)
    grades above its lightest."""
    sub = ctx.take(rows)
    boost = np.broadcast_to(np.asarray(level, dtype=np.int64), (rows.size,)).copy()
    return replace(sub, grade_boost=boost)


def _bisect(ctx, s, extras, lo, hi, ok_lo, name_lo):
    """Shortest passing step in (lo, hi] where lo fails; (steps, exhausted, name that set it).

    ``ok_lo`` / ``name_lo``: the result at ``lo`` (rows passing there keep lo)."""
    lo = lo.astype(np.int64).copy()
    hi = hi.astype(np.int64).copy()
    name = np.asarray(name_lo, dtype=object).copy()
    ok_hi, name_hi = _passes(ctx, s, extras, _length_at(ctx, hi))
    hi = np.where(ok_lo, lo, hi)
    exhausted = ~ok_lo & ~ok_hi
    name = np.where(exhausted, name_hi, name)
    active = ~ok_lo & ok_hi
    while True:
        active &= hi - lo > 1
        if not active.any():
            break
        mid = (lo + hi) // 2
        ok, mid_name = _passes(ctx, s, extras, _length_at(ctx, np.where(active, mid, hi)))
        hi = np.where(active & ok, mid, hi)
        fail = active & ~ok
        lo = np.where(fail, mid, lo)
        name = np.where(fail, mid_name, name)
    return hi, exhausted, name


def _scan(ctx, s, extras, rows, start, top):
    """Scan then bisect on rows ``rows`` of ``ctx`` (or a context holding those rows only),
    from ``start`` (failing) up to ``top``: (steps, exhausted, set_by) for those rows."""
    sub = ctx if ctx.n == rows.size else ctx.take(rows)
    sub_s = take_rows(s, rows, s.mask.shape[0]) if s.mask.shape[0] != rows.size else s
    k = rows.size
    lo = start.astype(np.int64).copy()
    found = np.zeros(k, dtype=bool)
    hi = top.astype(np.int64).copy()
    name = np.full(k, "", dtype=object)
    _, name_start = _passes(sub, sub_s, extras, _length_at(sub, lo))
    name[:] = name_start
    gap = np.maximum(top - start, 0)
    for p in range(1, SCAN_POINTS + 1):
        todo = np.flatnonzero(~found & (gap > 0))
        if todo.size == 0:
            break
        j = start[todo] + np.ceil(gap[todo] * p / SCAN_POINTS).astype(np.int64)
        j = np.minimum(np.maximum(j, lo[todo] + 1), top[todo])
        part = sub.take(todo) if todo.size != k else sub
        part_s = take_rows(sub_s, todo, k) if todo.size != k else sub_s
        ok, nm = _passes(part, part_s, extras, _length_at(part, j))
        found[todo[ok]] = True
        hi[todo[ok]] = j[ok]
        miss = todo[~ok]
        lo[miss] = j[~ok]
        name[miss] = nm[~ok]
    exhausted = ~found
    rows_b = np.flatnonzero(found & (hi - lo > 1))
    steps = np.where(found, hi, top)
    if rows_b.size:
        part = sub.take(rows_b) if rows_b.size != k else sub
        part_s = take_rows(sub_s, rows_b, k) if rows_b.size != k else sub_s
        b_steps, _, b_name = _bisect(
            part,
            part_s,
            extras,
            lo[rows_b],
            hi[rows_b],
            np.zeros(rows_b.size, bool),
            name[rows_b],
        )
        steps[rows_b] = b_steps
        name[rows_b] = b_name
    return steps, exhausted, name


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
