"""The screening engine: ``screen(corridor) -> CorridorResult``, vectorised over all segments.

Pipeline (each step one module, numpy over segments, no I/O, no UI):
arrays (inputs as arrays) -> context (geometry, loads, design strengths) -> internal.prepare
(tensions, grades, rupture) -> sizing (shortest passing L) -> sizing.evaluate (every check at
that L) -> verdict (clear / marginal / refer and the reasons) -> CorridorResult.

Checks added by other modules (compound, seismic) plug in as :class:`ExtraCheck` objects:
a module ``screening.engine.slip.compound`` or ``screening.engine.checks.seismic`` that defines
``EXTRA_CHECKS`` (a sequence of ExtraCheck) is picked up by :func:`default_extra_checks`.
"""

from __future__ import annotations

import importlib
import importlib.util
import multiprocessing
import threading
from collections.abc import Generator, Sequence
from concurrent.futures import ProcessPoolExecutor
from dataclasses import fields, replace

import numpy as np

from screening import __version__
from screening.engine.arrays import SegmentArrays, build_arrays
from screening.engine.checks.corrosion import steel_loss_per_side_mm
from screening.engine.checks.internal import prepare, pullout_layers
from screening.engine.combine import concat, merge, take
from screening.engine.context import (
    CheckValues,
    ExtraCheck,
    Grades,
    InternalSetup,
    ScreenContext,
    build_context,
)
from screening.engine.result import CDR_CAP, CheckArrays, CorridorResult, LayerArrays
from screening.engine.sizing import evaluate, size_length
from screening.engine.slip import kernel_search
from screening.engine.spacing import closer_spacing
from screening.engine.verdict import SIZING_CHECKS, decide
from screening.model import CHECKS, Corridor, FactorSet

__all__ = [
    "ExtraCheck",
    "ScreenContext",
    "concat",
    "default_extra_checks",
    "merge",
    "screen",
    "screen_arrays",
    "screen_iter",
]

ENGINE_VERSION = __version__
PLUGIN_MODULES = ("screening.engine.slip.compound", "screening.engine.checks.seismic")
KERNEL_WAIT_SEGMENTS = 100
"""A screen of this many segments or more waits for the compiled slip search (loaded from
numba's cache in under a second; compiled in a few seconds on a machine's first run); a
shorter one starts on the numpy path, which gives the same numbers, while it loads."""
POOL_MIN_SEGMENTS = 1000
"""A corridor this long or longer is screened by a pool of processes over chunks of
segments; a shorter one (and the interface's one-segment path, and ``screen_iter``) in
this process. Each segment's result does not depend on the others, so both give the same."""
POOL_WORKERS: int | None = None
"""Processes in the pool: None for one per CPU, 1 for no pool."""
POOL_CHUNKS_PER_WORKER = 2
"""Chunks per process, so the slow segments (long searches) spread over all of them..."""
POOL_CHUNK_MIN = 500
"""... but never fewer segments than this in a chunk: the engine works on whole arrays, and
a small chunk pays the same fixed cost per step for less work (125-segment chunks took
twice the CPU time per segment of one 1,000-segment screen)."""


def default_extra_checks() -> tuple[ExtraCheck, ...]:
    """ExtraCheck objects of the plug-in modules that exist (their ``EXTRA_CHECKS``)."""
    found: list[ExtraCheck] = []
    for name in PLUGIN_MODULES:
        if importlib.util.find_spec(name) is None:
            continue
        found.extend(getattr(importlib.import_module(name), "EXTRA_CHECKS", ()))
    return tuple(found)


def screen(
    corridor: Corridor,
    factor_set: FactorSet | None = None,
    extra_checks: Sequence[ExtraCheck] | None = None,
) -> CorridorResult:
    """Screen every segment of ``corridor`` under ``factor_set`` (default: the corridor's own).

    ``extra_checks`` None means :func:`default_extra_checks`; pass ``()`` for the core checks only.
    """
    extras = default_extra_checks() if extra_checks is None else tuple(extra_checks)
    n = len(corridor.segments)
    if n >= KERNEL_WAIT_SEGMENTS and extra_checks is None:
        kernel_search.warm_up()  # a long screen waits for the compiled slip search
    workers = _pool_workers(n, extra_checks)
    if workers > 1:
        return _screen_in_pool(corridor, factor_set, extra_checks is None, workers)
    return screen_arrays(build_arrays(corridor, factor_set), extras)


def _pool_workers(n: int, extra_checks) -> int:
    """How many processes screen ``n`` segments: 1 (this process) for short corridors, for
    checks passed in by the caller (they may not travel to another process), off the main
    thread or where processes cannot be forked."""
    wanted = POOL_WORKERS if POOL_WORKERS is not None else multiprocessing.cpu_count()
    if (
        wanted <= 1
        or n < POOL_MIN_SEGMENTS
        or extra_checks not in (None, ())
        or threading.current_thread() is not threading.main_thread()
        or threading.active_count() > 1
        or "fork" not in multiprocessing.get_all_start_methods()
    ):
        return 1
    return int(min(wanted, max(1, n // POOL_CHUNK_MIN)))


def _screen_chunk(corridor: Corridor, factor_set: FactorSet | None, plugins: bool):
    extras = default_extra_checks() if plugins else ()
    return screen_arrays(build_arrays(corridor, factor_set), extras)


def _screen_in_pool(
    corridor: Corridor, factor_set: FactorSet | None, plugins: bool, workers: int
) -> CorridorResult:
    """The screen over chunks of segments in ``workers`` forked processes, joined in order."""
    if plugins:
        kernel_search.warm_up()  # compiled (or loaded) once here; the forked processes inherit it
    segs = corridor.segments
    size = max(-(-len(segs) // (workers * POOL_CHUNKS_PER_WORKER)), POOL_CHUNK_MIN)
    chunks = [replace(corridor, segments=segs[i : i + size]) for i in range(0, len(segs), size)]
    context = multiprocessing.get_context("fork")
    with ProcessPoolExecutor(max_workers=workers, mp_context=context) as pool:
        parts = list(
            pool.map(_screen_chunk, chunks, [factor_set] * len(chunks), [plugins] * len(chunks))
        )
    return concat(parts)


def screen_iter(
    corridor: Corridor,
    chunk_size: int = 500,
    factor_set: FactorSet | None = None,
    extra_checks: Sequence[ExtraCheck] | None = None,
) -> Generator[tuple[int, int], None, CorridorResult]:
    """Screen in chunks of ``chunk_size`` segments, yielding ``(done, total)`` after each.

    The CorridorResult is the generator's return value (``StopIteration.value``; ``result =
    yield from screen_iter(...)`` in a driving generator). Identical to :func:`screen`.
    """
    if chunk_size < 1:
        raise ValueError("chunk_size must be at least 1")
    extras = default_extra_checks() if extra_checks is None else tuple(extra_checks)
    total = len(corridor.segments)
    parts: list[CorridorResult] = []
    for start in range(0, max(total, 1), chunk_size):
        chunk = replace(corridor, segments=corridor.segments[start : start + chunk_size])
        parts.append(screen_arrays(build_arrays(chunk, factor_set), extras))
        yield min(start + chunk_size, total), total
    return concat(parts)


def screen_arrays(a: SegmentArrays, extras: Sequence[ExtraCheck] = ()) -> CorridorResult:
    """The engine proper, on inputs already turned into arrays: the screen, then a closer
    spacing on the segments whose layers are too weak at any length and grade."""
    if a.n == 0:
        return _empty_screen(a, extras)
    with kernel_search.pinned():  # one path (compiled or numpy) for the whole screen
        result = _screen_once(a, extras)
        return closer_spacing(a, result, lambda sub, words: _screen_once(sub, extras, words))


def _empty_screen(a: SegmentArrays, extras: Sequence[ExtraCheck]) -> CorridorResult:
    """The screen of no segments, with every check and extras key a screen of one has: one
    sample segment is screened under the same factor set and rules, and its row dropped
    (the plug-in checks name their keys only when they have a row to report)."""
    from screening.engine.samples import make_corridor, make_segment

    one = build_arrays(make_corridor([make_segment()]))
    rows = {}
    for f in fields(SegmentArrays):
        value = getattr(a, f.name)
        if isinstance(value, np.ndarray | list) and len(value) == 0:
            rows[f.name] = getattr(one, f.name)
    return take(screen_arrays(replace(a, n=1, **rows), extras), [])


def _screen_once(
    a: SegmentArrays, extras: Sequence[ExtraCheck] = (), spacing_words: list[str] | None = None
) -> CorridorResult:
    """Size, check and judge every segment at its given spacing."""
    ctx = build_context(a)
    setup = prepare(ctx)
    ctx = replace(ctx, internal=setup)
    sizing = size_length(ctx, setup, extras)
    if sizing.grade_boost.any():
        ctx = replace(ctx, grade_boost=sizing.grade_boost)
    checks, grades = evaluate(ctx, setup, extras, sizing.length_m)
    unchecked = {name for name in CHECKS if not a.cases.uses(name).any()}
    layer_grade = np.where(setup.mask, grades.index, -1)
    several = (a.grade_count > 1)[:, None]
    heaviest = (
        (several & (layer_grade >= (a.grade_count - 1)[:, None]))
        | (setup.mask & ~grades.passes_rupture)
    ).any(axis=1)
    sizing_names = SIZING_CHECKS + tuple(c.name for c in extras if c.sizes_length)
    outcome = decide(
        ctx,
        sizing,
        checks,
        unchecked,
        heaviest_grade=heaviest,
        sizing_names=sizing_names,
        closer_spacing=spacing_words,
    )
    extra_arrays: dict[str, object] = {
        "embedment_ratio": ctx.geom.embedment_ratio,
        "max_length_m": ctx.geom.max_length_m,
        "search_exhausted": sizing.exhausted,
        "layer_count": ctx.geom.layer_count,
        "spacing_m": a.spacing_m,
        "design_life_years": a.design_life_years,
        "steel_loss_per_side_mm": np.where(
            a.inextensible, steel_loss_per_side_mm(a.zinc_um, a.design_life_years), 0.0
        ),
    }
    for check in extras:
        if getattr(check, "report", None) is not None:
            extra_arrays.update(check.report(ctx, sizing.length_m))
    return CorridorResult(
        ids=list(a.ids),
        factor_set=a.factor_set_id,
        engine_version=ENGINE_VERSION,
        verdict=outcome.verdict,
        reasons=outcome.reasons,
        exposed_height_m=a.exposed_height_m,
        design_height_m=ctx.geom.design_height_m,
        embedment_m=ctx.geom.embedment_m,
        length_m=sizing.length_m,
        rule_length_m=ctx.geom.rule_length_m,
        governing=outcome.governing,
        min_cdr=np.clip(outcome.min_cdr, 0.0, CDR_CAP),
        length_set_by=list(sizing.set_by),
        margin_check=outcome.margin_check,
        margin_cdr=np.clip(outcome.margin_cdr, 0.0, CDR_CAP),
        grade_boost=sizing.grade_boost,
        traffic_kpa=ctx.live_kpa,
        checks={name: _check_arrays(a, v, name in unchecked) for name, v in checks.items()},
        layers=_layer_arrays(ctx, setup, grades, sizing.length_m),
        grade_names=list(a.grade_names),
        extras=extra_arrays,
    )


def _check_arrays(a: SegmentArrays, v: CheckValues, unchecked: bool) -> CheckArrays:
    names = np.array([*a.cases.names, ""], dtype=object)
    case = names[np.where(v.case < 0, len(names) - 1, v.case)].tolist()
    if v.case_name is not None:
        case = [str(c) for c in v.case_name]
    if unchecked:
        detail = ["not checked by this factor set"] * a.n
    else:
        detail = list(v.detail) if v.detail is not None else [""] * a.n
    return CheckArrays(
        demand=np.asarray(v.demand, dtype=np.float64),
        capacity=np.asarray(v.capacity, dtype=np.float64),
        cdr=np.clip(np.asarray(v.cdr, dtype=np.float64), 0.0, CDR_CAP),
        case=case,
        detail=detail,
    )


def _layer_arrays(ctx: ScreenContext, s: InternalSetup, grades: Grades, length_m) -> LayerArrays:
    capacity, _ = pullout_layers(ctx, s, grades, length_m)
    uses = ctx.cases.uses("pullout")
    pick = uses if uses.any() else np.ones_like(uses)
    pull = np.where(pick[None, :, None], capacity, np.inf).min(axis=1)
    mask = s.mask
    return LayerArrays(
        mask=mask,
        depth_m=ctx.geom.layer_depth_m,
        tension_kn_m=s.tension_design,
        pullout_capacity_kn_m=np.where(mask, pull, 0.0),
        rupture_capacity_kn_m=grades.rupture_capacity,
        grade_index=np.where(mask & grades.passes_rupture, grades.index, -1),
        active_length_m=s.active_length,
    )
