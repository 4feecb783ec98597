"""Load factor and strength factor of one cross-section by DLO (upper bound, unsafe side).

``load_factor`` multiplies a named group of loads until the cheapest mechanism balances;
``strength_factor`` divides every strength by F until the load factor on the gravity loads
is 1. Both are *upper bounds*: the true factor is at most the value reported, and the
discretisation error is on the unsafe side (METHOD.md in this folder gives the measured bias).
"""

from __future__ import annotations

import time
from dataclasses import dataclass

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
) -> MechanismResult:
    """Strength reduction factor F with lambda(F) = 1 on the gravity loads (upper bound).

    c', tan phi', cu, the long-term strength, the pullout resistance and the facing
    connection of every layer are all divided by F: the same global factor on every resisting
    term as the slip-circle check, where the layer forces join the resisting moment that F
    divides, so the two checks compare like with like; pullout is itself frictional.
    lambda(F) is monotone but not smooth (a step where c' = 0: no mechanism below some F,
    free collapse above), so F is bracketed and found by scipy.optimize.brentq on
    lambda(F) - 1 (bisection steps whenever interpolation fails), never by a secant on
    log lambda. Each LP starts from the lines of the one before. F = 0: even at F = 1/64 the
    section collapses (for example a cohesionless vertical face with no layers).
    """
    from scipy.optimize import brentq

    t0 = time.perf_counter()
    problem = _problem(model)
    solver, nodes = _pick_solver(solver, nodes)
    run = _Runner(build_layout(problem, nodes), solver, GRAVITY)

    def g(f: float) -> float:
        return min(run(f), LAMBDA_CAP) - 1.0

    lo, hi = _bracket(g)
    if lo == 0.0:
        return _result(run, "strength factor", 0.0, t0)
    if np.isinf(hi):
        raise EngineError(
            f"mechanism check: no mechanism forms even with strengths divided by {F_MAX:g}"
        )
    root = brentq(g, lo, hi, xtol=rtol * lo, rtol=rtol, maxiter=60)
    run(root)
    return _result(run, "strength factor", root, t0)


def _bracket(g) -> tuple[float, float]:
    """(lo, hi) with g(lo) >= 0 > g(hi); (0, x) if none is stable, (x, inf) if all are.

    First step lambda(1)^(1/3) from F = 1 (lambda ~ 1/F for purely cohesive strength;
    frictional strength falls faster with F, so the cube root usually lands just past the
    root; measured on the bench walls), clipped to x1.05-x1.6, then steps of x1.25.
    """
    lam = g(1.0) + 1.0
    if lam >= 1.0:
        lo, f = 1.0, float(np.clip(lam ** (1.0 / 3.0), 1.05, 1.6))
        while g(f) >= 0.0:
            lo, f = f, f * 1.25
            if f > F_MAX:
                return lo, np.inf
        return lo, f
    hi, f = 1.0, float(np.clip(max(lam, 0.0) ** (1.0 / 3.0), 1.0 / 1.6, 1.0 / 1.05))
    while g(f) < 0.0:
        hi, f = f, f / 1.25
        if f < F_MIN:
            return 0.0, hi
    return f, hi
