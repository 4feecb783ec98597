"""Where the mechanism check runs: the segments of a screen that need it (METHOD.md, 6).

``run_mechanism(corridor, result)`` solves the referred and marginal segments of a screen
(``which="all"``: every segment) and gives per segment the mechanism factor (the least over
the factor set's cases), its target, the nodes, a flag and the words, and the mechanism's
lines for drawing; NaN and "" where it did not run. It is a cross-check, an upper bound
(unsafe side), never the design number: it never changes a verdict.

Segments are independent LPs, so they run in worker processes (``pool.py``, the standard
library's multiprocessing; ``workers``, default 2 on this kind of machine): the one loop over
segments in the engine, because each is one linear programme. ``progress(done, total)`` is
called after each segment and ``cancel()`` polled while waiting, so the same function runs
from a thread of the terminal interface.
"""

from __future__ import annotations

import math
import multiprocessing
import time
from collections.abc import Callable
from dataclasses import dataclass, replace

import numpy as np

from screening.engine.arrays import build_arrays
from screening.engine.mechanism.adapter import MechanismCase, mechanism_cases
from screening.engine.mechanism.flags import mechanism_flag, mechanism_where
from screening.engine.mechanism.pool import run_in_processes
from screening.engine.mechanism.root import COARSE_RTOL
from screening.engine.mechanism.solve import least_strength_factor
from screening.engine.result import CorridorResult, FloatArray
from screening.model import Corridor, FactorSet
from screening.model.errors import EngineError, WallscreenError

NODES = 250
"""Working grid of the mechanism check: about 0.2 s of CPU a factor on this machine from
the circles' F, and within about 1 % of the 300-node answer (bench_mechanism.py; METHOD.md
section 6 for its bias)."""
COARSE_NODES = 100
"""Grid that ranks several cases of one segment (and starts their searches)."""
CASE_SHORTLIST = 1.05
"""Cases whose coarse F is within this ratio of the least are solved on the working grid
(the coarse bias is alike for the cases of one section: it ranks them)."""
WHICH = ("flagged", "all")
NEEDS = ("refer", "marginal")
MIN_JUMP = 0.01
"""Lines whose jump is under this share of the largest are left out of the drawing."""


@dataclass(frozen=True)
class SegmentMechanism:
    """One segment's answer (small and picklable: it comes back from a worker process)."""

    row: int
    segment_id: str
    factor: float
    target: float
    nodes: int
    case: str
    flag: bool | None
    words: str
    seconds: float
    lines: tuple[tuple[float, float, float, float, float], ...] = ()
    """(x0, y0, x1, y1, jump) in section coordinates (x from the face into the fill, y up
    from the base of the reinforced zone, m); jump relative to the largest, 0-1."""


@dataclass(frozen=True)
class _Job:
    row: int
    segment_id: str
    cases: tuple[MechanismCase, ...]
    circles_factor: float
    nodes: int
    coarse_nodes: int


@dataclass(frozen=True)
class MechanismResults:
    """The mechanism check over the segments of a screen, in corridor order (n,)."""

    ids: list[str]
    segments: list[SegmentMechanism | None]
    """None where it did not run."""
    seconds: float
    cancelled: bool = False

    @property
    def ran(self) -> np.ndarray:
        """True where a factor was found (False: not asked for, or outside the model)."""
        return np.isfinite(self.factor)

    @property
    def factor(self) -> FloatArray:
        return np.array([math.nan if s is None else s.factor for s in self.segments])

    def flagged(self) -> list[int]:
        return [i for i, s in enumerate(self.segments) if s is not None and s.flag]

    def extras(self) -> dict[str, object]:
        """Per-segment values for ``CorridorResult.extras`` (JSON and the corridor file):
        NaN, None and "" where the check did not run."""
        segs = self.segments

        def col(get, empty):
            return [empty if s is None else get(s) for s in segs]

        return {
            "mechanism_factor": np.array(col(lambda s: s.factor, math.nan), dtype=np.float64),
            "mechanism_target": np.array(col(lambda s: s.target, math.nan), dtype=np.float64),
            "mechanism_nodes": np.array(col(lambda s: s.nodes or None, None), dtype=object),
            "mechanism_flag": np.array(col(lambda s: s.flag, None), dtype=object),
            "mechanism_words": col(lambda s: s.words, ""),
            "mechanism_case": col(lambda s: s.case, ""),
            "mechanism_lines": col(lambda s: [list(x) for x in s.lines], []),
        }


def needs_mechanism(result: CorridorResult, which: str = "flagged") -> np.ndarray:
    """Rows the check runs on: referred and marginal segments, or all of them."""
    if which not in WHICH:
        raise ValueError(f"which must be one of {', '.join(WHICH)}, not {which!r}")
    if which == "all":
        return np.arange(len(result), dtype=np.int64)
    return np.array([i for i, v in enumerate(result.verdict) if v in NEEDS], dtype=np.int64)


def with_mechanism(result: CorridorResult, mech: MechanismResults) -> CorridorResult:
    """``result`` with the mechanism values in its extras (the verdicts are unchanged)."""
    if list(mech.ids) != list(result.ids):
        raise EngineError("mechanism check: its segments do not match the screen's")
    return replace(result, extras={**result.extras, **mech.extras()})


def default_workers() -> int:
    return max(1, min(2, multiprocessing.cpu_count()))


def run_mechanism(
    corridor: Corridor,
    result: CorridorResult,
    which: str = "flagged",
    *,
    rows=None,
    factor_set: FactorSet | None = None,
    workers: int | None = None,
    progress: Callable[[int, int], None] | None = None,
    cancel: Callable[[], bool] | None = None,
    nodes: int = NODES,
    coarse_nodes: int = COARSE_NODES,
) -> MechanismResults:
    """The mechanism check on the segments of a screen that need it (module docstring).

    ``result`` must be the screen of ``corridor`` under ``factor_set`` (default: the
    corridor's own); ``rows`` overrides ``which``. A cancelled run returns what finished.
    """
    t0 = time.perf_counter()
    fs = factor_set if factor_set is not None else corridor.factor_set
    if fs.id != result.factor_set or [s.id for s in corridor.segments] != list(result.ids):
        raise EngineError(
            "mechanism check: the screen does not belong to this corridor and factor set"
        )
    rows = needs_mechanism(result, which) if rows is None else np.asarray(rows, dtype=np.int64)
    jobs = _jobs(corridor, fs, result, rows, nodes, coarse_nodes)
    done, cancelled = _run(jobs, workers, progress, cancel)
    segments: list[SegmentMechanism | None] = [None] * len(result)
    for s in done:
        segments[s.row] = s
    return MechanismResults(list(result.ids), segments, time.perf_counter() - t0, cancelled)


def _jobs(corridor, fs, result, rows, nodes, coarse_nodes) -> list[_Job]:
    if rows.size == 0:
        return []
    a = build_arrays(corridor, fs)
    cases = mechanism_cases(a, result, rows)
    circles = _circles_factor(result)
    by_row: dict[int, list[MechanismCase]] = {}
    for c in cases:
        by_row.setdefault(c.row, []).append(c)
    return [
        _Job(r, result.ids[r], tuple(by_row[r]), float(circles[r]), nodes, coarse_nodes)
        for r in rows.tolist()
    ]


def _circles_factor(result: CorridorResult) -> FloatArray:
    """Least Bishop F of the screen's critical compound and global circles (NaN: none)."""
    n = len(result)
    out = np.full(n, np.inf)
    for key in ("compound_factor", "global_factor"):
        value = result.extras.get(key)
        if value is not None:
            v = np.asarray(value, dtype=np.float64)
            out = np.fmin(out, np.where(np.isfinite(v) & (v > 0), v, np.inf))
    return np.where(np.isfinite(out), out, np.nan)


def _run(jobs, workers, progress, cancel) -> tuple[list[SegmentMechanism], bool]:
    """Solve every job once per distinct set of inputs (segments alike in every input share
    one answer), in this process or in worker processes."""
    groups: dict[tuple, list[_Job]] = {}
    for job in jobs:
        key = (tuple(c.section for c in job.cases), job.circles_factor)
        groups.setdefault(key, []).append(job)
    alike = {g[0].row: g for g in groups.values()}
    firsts = [g[0] for g in groups.values()]
    out: list[SegmentMechanism] = []

    def take(answer: SegmentMechanism) -> None:
        out.extend(replace(answer, row=j.row, segment_id=j.segment_id) for j in alike[answer.row])
        if progress is not None:
            progress(len(out), len(jobs))

    workers = default_workers() if workers is None else max(1, int(workers))
    if workers == 1 or len(firsts) <= 1:
        for job in firsts:
            if cancel is not None and cancel():
                return out, True
            take(solve_segment(job))
        return out, False
    _, cancelled = run_in_processes(solve_segment, firsts, min(workers, len(firsts)), take, cancel)
    return out, cancelled


def solve_segment(job: _Job) -> SegmentMechanism:
    """The least factor over the segment's cases, with its mechanism, flag and words."""
    t0 = time.perf_counter()
    usable = [c for c in job.cases if c.section is not None]
    if not usable:
        why = job.cases[0].problem if job.cases else "not run: no case of the factor set"
        return _not_run(job, why, t0)
    try:
        guess = job.circles_factor if math.isfinite(job.circles_factor) else None
        if len(usable) == 1:
            # the search starts from the circles' F (it only saves LPs; the working grid
            # alone decides the answer)
            ranked = [(usable[0], guess)]
        else:
            # several cases: a coarse grid ranks them (its bias is alike for the cases of one
            # section) and gives the fine searches their starts
            coarse = least_strength_factor(
                [c.section for c in usable],
                [guess] * len(usable),
                nodes=job.coarse_nodes,
                rtol=COARSE_RTOL,
                within=CASE_SHORTLIST,
            )
            ranked = [(c, r.factor) for c, r in zip(usable, coarse, strict=True) if r is not None]
        fine = least_strength_factor(
            [c.section for c, _ in ranked], [s for _, s in ranked], nodes=job.nodes
        )
        case, fine = next((c, r) for (c, _), r in zip(ranked, fine, strict=True) if r is not None)
    except WallscreenError as err:
        return _not_run(job, f"not run: {err}", t0)
    flag, words = mechanism_flag(fine.factor, case.target, job.circles_factor)
    m = fine.mechanism
    jump = np.hypot(m.shear, m.normal)
    keep = jump >= MIN_JUMP
    lines = tuple(
        (float(a), float(b), float(c), float(d), float(e))
        for a, b, c, d, e in zip(
            m.x0_m[keep], m.y0_m[keep], m.x1_m[keep], m.y1_m[keep], jump[keep], strict=True
        )
    )
    levels = np.array([lay.level_m for lay in case.section.layers])
    where = mechanism_where(m.x0_m, m.y0_m, m.x1_m, m.y1_m, jump, case.section.length_m, levels)
    return SegmentMechanism(
        row=job.row,
        segment_id=job.segment_id,
        factor=float(fine.factor),
        target=float(case.target),
        nodes=int(fine.nodes),
        case=case.case,
        flag=flag,
        words=f"{words}; {case.case}; {where}",
        seconds=time.perf_counter() - t0,
        lines=lines,
    )


def _not_run(job: _Job, why: str, t0: float) -> SegmentMechanism:
    target = job.cases[0].target if job.cases else math.nan
    return SegmentMechanism(
        job.row, job.segment_id, math.nan, target, 0, "", None, why, time.perf_counter() - t0
    )
