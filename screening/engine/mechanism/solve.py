"""Load factor and strength factor of one cross-section by DLO (upper bound, unsafe side).

``load_factor`` multiplies a named group of loads until the cheapest mechanism balances;
``strength_factor`` divides every strength by F until the load factor on the gravity loads
is 1. Both are *upper bounds*: the true factor is at most the value reported, and the
discretisation error is on the unsafe side (METHOD.md in this folder gives the measured bias).
"""

from __future__ import annotations

import time
from collections.abc import Sequence
from dataclasses import dataclass, replace

import numpy as np

from screening.engine.mechanism.layout import Layout, build_layout, columns
from screening.engine.mechanism.lp import Outcome, solve_highs, solve_scipy
from screening.engine.mechanism.problem import DEAD, FOOTING, LIVE, WEIGHT, Problem
from screening.engine.mechanism.root import (
    COARSE_RTOL,
    F_MAX,
    F_MIN,
    LAMBDA_CAP,
    RTOL,
    Root,
    find_root,
)
from screening.engine.mechanism.section import MechanismSection, wall_problem
from screening.model.errors import EngineError

UPPER_BOUND_NOTE = (
    "mechanism check: upper bound (unsafe side); the true factor may be lower. "
    "A cross-check, never the design number."
)
DEFAULT_NODES = 350
SCIPY_NODE_CAP = 220
"""Largest grid for the scipy fallback (cold re-solves: slower per round than highspy)."""
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
    column of the last one and its basis: 52 % fewer simplex iterations than the short lines
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
    free collapse above), so F is found by a safeguarded Newton search (``root.find_root``):
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
    root = find_root(run, 1.0 if start is None else float(start), rtol)
    return _strength_result(run, root, t0)


def _strength_result(run: _Runner, root: Root, t0: float) -> MechanismResult:
    if not np.isfinite(root.factor):
        raise EngineError(
            f"mechanism check: no mechanism forms even with strengths divided by {F_MAX:g}"
        )
    run(root.at)  # the mechanism reported is the one found at the last F evaluated near the root
    return replace(_result(run, "strength factor", root.factor, t0), slope=root.slope)


def least_strength_factor(
    models: Sequence[MechanismSection | Problem],
    starts: Sequence[float | None],
    *,
    nodes: int = DEFAULT_NODES,
    solver: str = "auto",
    rtol: float = RTOL,
    within: float = 1.0,
) -> list[MechanismResult | None]:
    """:func:`strength_factor` of each model whose F is within ``within`` times the least
    of them, None for the others (their F is only known to be above that): the cases of one
    segment, where only the least F matters (and those close to it, to rank them).

    One LP of each at its start (``starts``, None: F = 1) gives the root its own slope points
    to; the searches run from the lowest of these, and each one after the first stops as soon
    as an LP shows its F above ``within`` times the least so far (often that first LP)."""
    t0 = time.perf_counter()
    solver, nodes = _pick_solver(solver, nodes)
    runs = [_Runner(build_layout(_problem(m), nodes), solver, GRAVITY) for m in models]
    firsts = [float(np.clip(1.0 if s is None else s, F_MIN, F_MAX)) for s in starts]
    guesses = []
    for run, f in zip(runs, firsts, strict=True):
        lam, k = run.point(f)
        guesses.append(f * lam ** (1.0 / k) if np.isfinite(k) else (0.0 if lam == 0 else f))
    least = np.inf
    found: list[MechanismResult | None] = [None] * len(runs)
    for i in np.argsort(guesses, kind="stable"):
        root = find_root(runs[i], firsts[i], rtol, enough=within * least)
        if root.above:
            continue
        found[i] = _strength_result(runs[i], root, t0)
        least = min(least, root.factor)
    return [r if r is not None and r.factor <= within * least else None for r in found]
