"""Load factor and strength factor of one cross-section by DLO (upper bound, unsafe side).

``load_factor`` multiplies a named group of loads until the cheapest mechanism balances;
``strength_factor`` divides every strength by F until the load factor on the gravity loads
is 1. Both are *upper bounds*: the true factor is at most the value reported, and the
discretisation error is on the unsafe side (METHOD.md in this folder gives the measured bias).
"""

from __future__ import annotations

import time
from dataclasses import dataclass, replace

import numpy as np

from screening.engine.mechanism.layout import Layout, build_layout, columns
from screening.engine.mechanism.lp import Outcome, solve_highs, solve_scipy
from screening.engine.mechanism.problem import DEAD, FOOTING, LIVE, WEIGHT, Problem
from screening.engine.mechanism.section import MechanismSection, wall_problem
from screening.model.errors import EngineError

UPPER_BOUND_NOTE = (
    "mechanism check: upper bound (unsafe side); the true factor may be lower. "
    "A cross-check, never the design number."
)
DEFAULT_NODES = 350
SCIPY_NODE_CAP = 220
"""Largest grid for the scipy fallback (cold re-solves: slower per round than highspy)."""
F_MIN, F_MAX = 1.0 / 64.0, 64.0
LAMBDA_CAP = 1e3
"""lambda above this counts as 'no mechanism' in the root search on F."""
GRAVITY = (WEIGHT, DEAD, LIVE)


@dataclass(frozen=True)
class Mechanism:
    """The active lines of the critical mechanism, arrays (a,), jumps scaled so that the
    largest jump magnitude is 1 (the mechanism has no size of its own)."""

    x0_m: np.ndarray
    y0_m: np.ndarray
    x1_m: np.ndarray
    y1_m: np.ndarray
    shear: np.ndarray
    normal: np.ndarray
    material: np.ndarray
    dissipation_share: np.ndarray
    """Share of the internal dissipation (soil and layers) on each line."""

    @property
    def n(self) -> int:
        return int(self.x0_m.shape[0])


@dataclass(frozen=True)
class MechanismResult:
    """One factor with its mechanism and how it was found."""

    factor: float
    kind: str
    """'load factor' or 'strength factor'."""
    factored: tuple[str, ...]
    strength_factor: float
    load_factor: float
    nodes: int
    candidate_lines: int
    lines_used: int
    """Lines (columns) in the final LP after column generation."""
    active_lines: int
    lp_solves: int
    rounds: int
    seconds: float
    solver: str
    mechanism: Mechanism
    history: tuple[tuple[float, float], ...]
    """(strength factor, load factor) of every LP solved."""
    note: str = UPPER_BOUND_NOTE
    slope: float = 3.0
    """-d log lambda / d log F near the answer (strength factors; a start for a finer grid)."""


def _problem(model: MechanismSection | Problem) -> Problem:
    return wall_problem(model) if isinstance(model, MechanismSection) else model


def _default_factored(problem: Problem) -> tuple[str, ...]:
    return (FOOTING,) if problem.footing is not None else GRAVITY


def _pick_solver(solver: str, nodes: int) -> tuple[str, int]:
    if solver == "auto":
        try:
            import highspy  # noqa: F401

            solver = "highspy"
        except ImportError:
            solver = "scipy"
    if solver not in ("highspy", "scipy"):
        raise ValueError(f"unknown solver {solver!r}; valid: auto, highspy, scipy")
    return solver, (min(nodes, SCIPY_NODE_CAP) if solver == "scipy" else nodes)


class _Runner:
    """Solves the LP at successive strength factors, each from the previous mechanism's lines.

    Within one LP the column generation re-solves hot (HiGHS keeps its basis as columns are
    added); across strength factors every coefficient with tan phi' changes, and the old
    basis proved a worse start than none, so only the lines are carried over."""

    def __init__(self, layout: Layout, solver: str, factored: tuple[str, ...]) -> None:
        self.layout = layout
        self.solver = solver
        self.factored = factored
        self.start = np.repeat(layout.lines.initial, 2)
        self.history: list[tuple[float, float]] = []
        self.rounds = 0
        self.last: Outcome | None = None
        self.done: dict[float, Outcome] = {}

    def __call__(self, strength_factor: float) -> float:
        if strength_factor in self.done:
            self.last, self.last_f = self.done[strength_factor], float(strength_factor)
            return self.last.value
        cols = columns(self.layout, strength_factor, self.factored)
        if self.solver == "highspy":
            out = solve_highs(cols, self.start)
        else:
            out = solve_scipy(cols, self.start)
        # the next LP starts from the short lines and this mechanism's lines only: a larger
        # pool or this LP's basis made HiGHS slower at a new F (measured, bench_mechanism.py)
        self.start = (out.multipliers > 0) | np.repeat(self.layout.lines.initial, 2)
        self.rounds += out.rounds
        self.history.append((float(strength_factor), out.value))
        self.last = out
        self.last_f = float(strength_factor)
        self.done[strength_factor] = out
        return out.value


def _mechanism(layout: Layout, out: Outcome, strength_factor: float) -> Mechanism:
    lines, nodes = layout.lines, layout.nodes
    p = out.multipliers.reshape(-1, 2)
    total = p.sum(axis=1)
    active = np.flatnonzero(total > 1e-9 * max(total.max(initial=0.0), 1e-300))
    shear = p[active, 0] - p[active, 1]
    normal = layout.tan_phi[active] / strength_factor * total[active]
    size = np.hypot(shear, normal)
    scale = float(size.max()) if size.size else 1.0
    cols = columns(layout, strength_factor, ())
    cost = cols.cost.reshape(-1, 2)
    dissipation = np.maximum(cost[active, 0] * p[active, 0] + cost[active, 1] * p[active, 1], 0)
    share = dissipation / dissipation.sum() if dissipation.sum() > 0 else dissipation
    a, b = lines.a[active], lines.b[active]
    return Mechanism(
        x0_m=nodes.x_m[a],
        y0_m=nodes.y_m[a],
        x1_m=nodes.x_m[b],
        y1_m=nodes.y_m[b],
        shear=shear / scale,
        normal=normal / scale,
        material=lines.material[active],
        dissipation_share=share,
    )


def _result(run: _Runner, kind: str, factor: float, t0: float) -> MechanismResult:
    out = run.last
    layout = run.layout
    mech = _mechanism(layout, out, run.last_f)
    return MechanismResult(
        factor=float(factor),
        kind=kind,
        factored=run.factored,
        strength_factor=run.last_f,
        load_factor=out.value,
        nodes=layout.nodes.n,
        candidate_lines=int(layout.lines.n),
        lines_used=int(out.in_model.sum()) // 1,
        active_lines=mech.n,
        lp_solves=len(run.history),
        rounds=run.rounds,
        seconds=time.perf_counter() - t0,
        solver=run.solver,
        mechanism=mech,
        history=tuple(run.history),
    )


def load_factor(
    model: MechanismSection | Problem,
    strength_factor: float = 1.0,
    *,
    factored: tuple[str, ...] | None = None,
    nodes: int = DEFAULT_NODES,
    solver: str = "auto",
) -> MechanismResult:
    """Collapse multiplier lambda on the ``factored`` loads, the others held (upper bound).

    Default ``factored``: the footing pressure where the problem has a footing (lambda is
    then the bearing pressure, kPa), else the gravity loads (self weight, dead and live
    surcharge): lambda says how many times heavier the soil and its surcharges could be before
    the cheapest mechanism forms. Pore pressures are never factored. Strengths (c', tan phi',
    cu and the layers) are divided by ``strength_factor``. lambda = inf: no mechanism does
    positive work (nothing can fail under these loads).
    """
    t0 = time.perf_counter()
    problem = _problem(model)
    solver, nodes = _pick_solver(solver, nodes)
    run = _Runner(build_layout(problem, nodes), solver, factored or _default_factored(problem))
    lam = run(strength_factor)
    return _result(run, "load factor", lam, t0)


def strength_factor(
    model: MechanismSection | Problem,
    *,
    nodes: int = DEFAULT_NODES,
    solver: str = "auto",
    rtol: float = 3e-3,
    coarse_nodes: int | None = None,
    start: tuple[float, float] | None = None,
) -> MechanismResult:
    """Strength reduction factor F with lambda(F) = 1 on the gravity loads (upper bound).

    c', tan phi', cu, the long-term strength, the pullout resistance and the facing
    connection of every layer are all divided by F: the same global factor on every resisting
    term as the slip-circle check, where the layer forces join the resisting moment that F
    divides, so the two checks compare like with like; pullout is itself frictional.
    lambda(F) is monotone but not smooth (a step where c' = 0: no mechanism below some F,
    free collapse above), so F is found by a bracketing search (:func:`_find_root`): steps
    from the slope of log lambda against log F while the root is not bracketed, then
    interpolation kept inside the bracket, bisection where lambda is 0 or infinite. Each LP
    starts from the lines of the one before. F = 0: even at F = 1/64 the section collapses
    (for example a cohesionless vertical face with no layers).

    ``coarse_nodes``: first find F on a grid of that many nodes (cheap) and start the search
    on the fine grid from it and its slope: two to four fine LPs instead of five or six
    (bench_mechanism.py). ``start``: (F, slope) of such a coarse answer already at hand
    (``MechanismResult.factor`` and ``.slope``). The fine grid alone decides the answer.
    """
    t0 = time.perf_counter()
    problem = _problem(model)
    solver, nodes = _pick_solver(solver, nodes)
    if start is None and coarse_nodes:
        coarse = strength_factor(problem, nodes=coarse_nodes, solver=solver, rtol=COARSE_RTOL)
        if coarse.factor == 0.0:
            return replace(coarse, seconds=time.perf_counter() - t0)
        start = (coarse.factor, coarse.slope)
    guess, slope, first_step = 1.0, FIRST_SLOPE, STEP_RANGE[1]
    if start is not None:
        guess, slope, first_step = float(start[0]), float(start[1]), 1.0 + 4.0 * COARSE_RTOL
    run = _Runner(build_layout(problem, nodes), solver, GRAVITY)
    root, at, slope = _find_root(run, guess, slope, rtol, first_step)
    if not np.isfinite(root):
        raise EngineError(
            f"mechanism check: no mechanism forms even with strengths divided by {F_MAX:g}"
        )
    run(at)  # the mechanism reported is the one found at the last F evaluated near the root
    return replace(_result(run, "strength factor", root, t0), slope=slope)


FIRST_SLOPE = 3.0
"""Guess of -d log lambda / d log F before two points give it: lambda ~ 1/F for purely
cohesive strength, faster for frictional (dilation falls with tan phi'/F); 3 landed near the
root on the bench walls (measured)."""
COARSE_RTOL = 1e-2
COLLAPSE_STEP = 1.1
"""Step down in F from a collapse (lambda = 0: no slope to go by) before the root is
bracketed; the start is usually within 10 % of the root (coarse grid or slip circles)."""
STEP_RTOL = 1e-2
"""Tolerance on F where lambda steps from above 1 to 0 (c' = 0: a frictional mechanism
starts to do work for nothing): bisection only narrows a step, so it stops at 1 % and
reports the stable end (the lower F)."""
SLOPE_RANGE = (0.5, 12.0)
STEP_RANGE = (1.02, 1.6)
"""Smallest and largest step of F (as a ratio) while the root is not yet bracketed."""


def _find_root(
    run, f0: float, slope: float, rtol: float, first_step: float = 1.6
) -> tuple[float, float, float]:
    """(F, F evaluated last near it, slope) with lambda(F) = 1; (0, ., .) when even F_MIN
    collapses, (inf, ., .) when nothing collapses up to F_MAX.

    lambda ~ F^-k locally, so log lambda is nearly linear in log F: a point with
    |log lambda| <= k rtol is within rtol of the root, which is then F lambda^(1/k).
    ``first_step`` caps the first move from ``f0`` (small when ``f0`` comes from a coarse
    grid: the fine root is within a few per cent of it, and a step in lambda is then
    bracketed closely).
    """
    lo = hi = None  # (F, lambda) with lambda >= 1 (stable) / < 1 (collapses)
    last = None
    f = float(np.clip(f0, F_MIN, F_MAX))
    for step_no in range(ROOT_STEPS):
        cap = first_step if step_no == 0 else STEP_RANGE[1]
        lam = min(run(f), LAMBDA_CAP)
        if lam >= 1.0:
            lo = (f, lam) if lo is None or f > lo[0] else lo
        else:
            hi = (f, lam) if hi is None or f < hi[0] else hi
        if last is not None and lam > 0.0 and last[1] > 0.0 and abs(f - last[0]) > 0.0:
            k = -np.log(lam / last[1]) / np.log(f / last[0])
            if np.isfinite(k):
                slope = float(np.clip(k, *SLOPE_RANGE))
        last = (f, lam)
        if 0.0 < lam < LAMBDA_CAP and abs(np.log(lam)) <= slope * rtol:
            return f * lam ** (1.0 / slope), f, slope
        if lo is not None and hi is not None:
            ratio = hi[0] / lo[0]
            if ratio - 1.0 <= (max(rtol, STEP_RTOL) if hi[1] == 0.0 else rtol):
                return lo[0], lo[0], slope
            if hi[1] > 0.0 and lo[1] < LAMBDA_CAP:
                k = np.log(lo[1] / hi[1]) / np.log(ratio)
                t = np.log(lo[1]) / k / np.log(ratio) if k > 0 else 0.5
                t = float(np.clip(t, 0.1, 0.9))
            else:
                t = 0.5
            f = lo[0] * ratio**t
        elif lo is not None:
            if f >= F_MAX:
                return np.inf, f, slope
            step = lam ** (1.0 / slope) * (1.0 + 2.0 * rtol) if lam < LAMBDA_CAP else STEP_RANGE[1]
            f = min(f * float(np.clip(step, STEP_RANGE[0], cap)), F_MAX)
        else:
            if f <= F_MIN:
                return 0.0, f, slope
            step = (1.0 / lam) ** (1.0 / slope) * (1.0 + 2.0 * rtol) if lam > 0 else COLLAPSE_STEP
            f = max(f / float(np.clip(step, STEP_RANGE[0], cap)), F_MIN)
    raise EngineError(
        f"mechanism check: the strength factor did not settle in {ROOT_STEPS} linear programmes"
    )


ROOT_STEPS = 40
