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
    """Solves the LP at successive strength factors, each from the LP before.

    Within one LP the column generation re-solves hot (HiGHS keeps its basis as columns are
    added). Across strength factors every coefficient with tan phi' changes, but the Newton
    steps of the root search move F by a few per cent, so the next LP starts with every
    column of the last one and its basis: 45 % fewer simplex iterations than the short lines
    plus the last mechanism from scratch (bench_mechanism.py item 4; the old basis did not
    pay when F moved by 20-40 % a step)."""

    def __init__(self, layout: Layout, solver: str, factored: tuple[str, ...]) -> None:
        self.layout = layout
        self.solver = solver
        self.factored = factored
        self.start = np.repeat(layout.lines.initial, 2)
        self.warm = None
        self.history: list[tuple[float, float]] = []
        self.rounds = 0
        self.last: Outcome | None = None
        self.done: dict[float, Outcome] = {}
        self.slopes: dict[float, float] = {}

    def __call__(self, strength_factor: float) -> float:
        """lambda at a strength factor (one LP, or the one already solved there)."""
        f = float(strength_factor)
        if f in self.done:
            self.last, self.last_f = self.done[f], f
            return self.last.value
        cols = columns(self.layout, f, self.factored)
        if self.solver == "highspy":
            out = solve_highs(cols, self.start, self.warm)
        else:
            out = solve_scipy(cols, self.start)
        self.start = out.in_model | (out.multipliers > 0)
        if out.basis is not None or not WARM_START:
            # a collapse has no basis to give: the last bounded LP's basis stays the start
            self.warm = out.basis if WARM_START else None
        self.rounds += out.rounds
        self.history.append((f, out.value))
        self.last = out
        self.last_f = f
        self.done[f] = out
        return out.value

    def point(self, strength_factor: float) -> tuple[float, float]:
        """(lambda, k) at a strength factor: k = -d log lambda / d log F of the optimal
        mechanism (:func:`_slope`), NaN where lambda is 0 or infinite."""
        f = float(strength_factor)
        lam = self(f)
        if f not in self.slopes:
            self.slopes[f] = _slope(self.layout, f, self.factored, self.done[f])
        return lam, self.slopes[f]


WARM_START = True
"""Carry the last LP's columns and basis to the next strength factor (``_Runner``)."""
SLOPE_STEP = 1e-4
"""Relative step in F of the central difference in :func:`_slope`."""


def _slope(layout: Layout, f: float, factored: tuple[str, ...], out: Outcome) -> float:
    """k = -d log lambda / d log F at F = f from one LP, without solving another.

    Sensitivity of an LP optimum (the envelope theorem): with the optimal multipliers p and
    row duals y held, d lambda / dF = sum_j p_j d(c_j - A_j^T y)/dF over the columns, whose
    coefficients are smooth in F (tan phi'/F, c'/F and the layer holds/F); a central
    difference of the reduced costs gives it. The LP's own lambda(F) has kinks where the
    optimal basis changes and steps where a frictional mechanism starts to work for nothing,
    so this is the slope of the current mechanism: the root search uses it for Newton steps
    and keeps a bracket for the rest."""
    lam = out.value
    if not (0.0 < lam < LAMBDA_CAP) or out.dual is None:
        return float("nan")
    used = np.flatnonzero(out.multipliers.reshape(-1, 2).sum(axis=1) > 0.0)
    p = out.multipliers.reshape(-1, 2)[used].ravel()
    up = columns(layout, f * (1.0 + SLOPE_STEP), factored, used).reduced_cost(out.dual)
    down = columns(layout, f * (1.0 - SLOPE_STEP), factored, used).reduced_cost(out.dual)
    dlam_df = float(p @ (up - down)) / (2.0 * SLOPE_STEP * f)
    return -f / lam * dlam_df


def _mechanism(layout: Layout, out: Outcome, strength_factor: float) -> Mechanism:
    lines, nodes = layout.lines, layout.nodes
    p = out.multipliers.reshape(-1, 2)
    total = p.sum(axis=1)
    active = np.flatnonzero(total > 1e-9 * max(total.max(initial=0.0), 1e-300))
    shear = p[active, 0] - p[active, 1]
    normal = layout.tan_phi[active] / strength_factor * total[active]
    size = np.hypot(shear, normal)
    scale = float(size.max()) if size.size else 1.0
    cost = columns(layout, strength_factor, (), active).cost.reshape(-1, 2)
    dissipation = np.maximum(cost[:, 0] * p[active, 0] + cost[:, 1] * p[active, 1], 0)
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


RTOL = 5e-3
"""Tolerance of F: the search stops at an LP whose Newton step to the root is at most this
share of F, and reports the root that step gives (a screening cross-check: 0.5 % is well
inside the grid's own bias; the Newton answer is usually far closer, bench item 4)."""
COARSE_RTOL = 1e-2
FIRST_SLOPE = 3.0
"""k = -d log lambda / d log F where an LP gives none (lambda 0 or infinite) yet."""
COLLAPSE_STEP = 1.1
"""Step down in F from a collapse (lambda = 0: no slope to go by) before the root is
bracketed; the start is usually within 10 % of the root (coarse grid or slip circles)."""
STEP_RTOL = 1e-2
"""Tolerance on F where lambda steps from above 1 to 0 (c' = 0: a frictional mechanism
starts to do work for nothing): bisection only narrows a step, so it stops at 1 % and
reports the stable end (the lower F)."""
SLOPE_RANGE = (0.5, 12.0)
MAX_STEP = 1.6
"""Largest step of F (as a ratio) while the root is not yet bracketed."""
INNER = 0.05
"""A Newton step inside a bracket must land this share (of log F) inside either end."""
ROOT_STEPS = 40


def strength_factor(
    model: MechanismSection | Problem,
    *,
    nodes: int = DEFAULT_NODES,
    solver: str = "auto",
    rtol: float = RTOL,
    coarse_nodes: int | None = None,
    start: float | None = None,
) -> MechanismResult:
    """Strength reduction factor F with lambda(F) = 1 on the gravity loads (upper bound).

    c', tan phi', cu, the long-term strength, the pullout resistance and the facing
    connection of every layer are all divided by F: the same global factor on every resisting
    term as the slip-circle check, where the layer forces join the resisting moment that F
    divides, so the two checks compare like with like; pullout is itself frictional.
    lambda(F) is monotone but not smooth (a step where c' = 0: no mechanism below some F,
    free collapse above), so F is found by a safeguarded Newton search (:func:`_find_root`):
    Newton steps on log lambda against log F with the slope each LP gives by itself
    (:func:`_slope`), kept inside a bracket once there is one, bisection where lambda is 0 or
    infinite. Each LP starts from the lines of the one before. F = 0: even at F = 1/64 the
    section collapses (for example a cohesionless vertical face with no layers).

    ``start``: a guess of F (the slip circles' factor, or a coarse grid's answer); the
    search begins there instead of at F = 1. ``coarse_nodes``: first find F on a grid of that
    many nodes and start from it. Either only saves LPs: the working grid alone decides the
    answer, to ``rtol``.
    """
    t0 = time.perf_counter()
    problem = _problem(model)
    solver, nodes = _pick_solver(solver, nodes)
    if start is None and coarse_nodes:
        coarse = strength_factor(problem, nodes=coarse_nodes, solver=solver, rtol=COARSE_RTOL)
        if coarse.factor == 0.0:
            return replace(coarse, seconds=time.perf_counter() - t0)
        start = coarse.factor
    run = _Runner(build_layout(problem, nodes), solver, GRAVITY)
    root, at, slope = _find_root(run, 1.0 if start is None else float(start), rtol)
    if not np.isfinite(root):
        raise EngineError(
            f"mechanism check: no mechanism forms even with strengths divided by {F_MAX:g}"
        )
    run(at)  # the mechanism reported is the one found at the last F evaluated near the root
    return replace(_result(run, "strength factor", root, t0), slope=slope)


def _newton(point) -> float:
    """The root that the point's own slope points to (NaN without a slope)."""
    f, lam, k = point
    return f * lam ** (1.0 / k) if np.isfinite(k) else float("nan")


def _find_root(run, f0: float, rtol: float) -> tuple[float, float, float]:
    """(F, F evaluated last near it, slope) with lambda(F) = 1; (0, ., .) when even F_MIN
    collapses, (inf, ., .) when nothing collapses up to F_MAX.

    lambda ~ F^-k locally and each LP gives its own k (:func:`_slope`), so from a point the
    root is near F lambda^(1/k) (a Newton step on log lambda against log F); a point whose
    step is at most ``rtol`` ends the search with that root. Until the root is bracketed the
    steps are Newton steps capped at MAX_STEP (COLLAPSE_STEP down from a collapse); inside a
    bracket, the Newton step of the end nearer lambda = 1 where it lands inside the bracket,
    else the secant of log lambda between the ends, else (an end at lambda 0 or infinite:
    no slope to go by) the geometric midpoint. A bracket of a step narrowed to STEP_RTOL
    reports its stable end.
    """
    lo = hi = None  # (F, lambda, k) with lambda >= 1 (stable) / < 1 (collapses)
    slope = FIRST_SLOPE
    f = float(np.clip(f0, F_MIN, F_MAX))
    for _ in range(ROOT_STEPS):
        lam, k = run.point(f)
        lam = min(lam, LAMBDA_CAP)
        smooth = 0.0 < lam < LAMBDA_CAP and np.isfinite(k)
        k = float(np.clip(k, *SLOPE_RANGE)) if smooth else float("nan")
        if smooth:
            slope = k
            if abs(np.log(lam)) <= k * rtol:
                return f * lam ** (1.0 / k), f, k
        here = (f, lam, k)
        if lam >= 1.0:
            lo = here if lo is None or f > lo[0] else lo
        else:
            hi = here if hi is None or f < hi[0] else hi
        if lo is not None and hi is not None:
            ratio = hi[0] / lo[0]
            edge = hi[1] == 0.0 or lo[1] >= LAMBDA_CAP
            if ratio - 1.0 <= (max(rtol, STEP_RTOL) if edge else rtol):
                return lo[0], lo[0], slope
            f = _inside(lo, hi, ratio)
        elif lo is not None:
            if f >= F_MAX:
                return np.inf, f, slope
            step = _newton(here) / f if smooth else MAX_STEP
            f = min(f * float(np.clip(step, 1.0, MAX_STEP)), F_MAX)
        else:
            if f <= F_MIN:
                return 0.0, f, slope
            step = f / _newton(here) if smooth else COLLAPSE_STEP
            f = max(f / float(np.clip(step, 1.0, MAX_STEP)), F_MIN)
    raise EngineError(
        f"mechanism check: the strength factor did not settle in {ROOT_STEPS} linear programmes"
    )


def _inside(lo, hi, ratio: float) -> float:
    """The next F inside a bracket (``_find_root``)."""
    low, high = lo[0] * ratio**INNER, lo[0] * ratio ** (1.0 - INNER)
    ends = sorted((e for e in (lo, hi) if np.isfinite(e[2])), key=lambda e: abs(np.log(e[1])))
    for end in ends:
        guess = _newton(end)
        if low <= guess <= high:
            return guess
    if hi[1] > 0.0 and lo[1] < LAMBDA_CAP:
        k = np.log(lo[1] / hi[1]) / np.log(ratio)
        t = float(np.clip(np.log(lo[1]) / k / np.log(ratio), 0.1, 0.9)) if k > 0 else 0.5
        return lo[0] * ratio**t
    return lo[0] * ratio**0.5
