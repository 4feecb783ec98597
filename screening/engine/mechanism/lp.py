"""The kinematic LP of discontinuity layout optimization and its column generation.

Variables [pub, Smith & Gilbert 2007, Proc. R. Soc. A 463, eqs. 2-6]: each candidate line i
(length L, unit tangent t from node a to node b, left normal m = (-t_y, t_x)) has two plastic
multipliers p+ and p- >= 0: shear jump s = p+ - p-, normal jump (opening) n = tan(phi)(p+ + p-),
so the jump vector of a multiplier is d = +-t + tan(phi) m (Mohr-Coulomb, associated flow;
Tresca is phi = 0, no dilation). Dissipation c L (p+ + p-) plus the layers it stretches
(reinforcement.py).

    minimise    sum (D_k - W0_k) p_k                 (dissipation minus work of fixed loads)
    subject to  sum_k B_k p_k = 0                    (compatibility at every non-free node)
                sum_k W_k p_k = 1                    (work of the factored loads)
                [footing moves vertically: sum of crossed jumps' x = 0]
                p >= 0

B_k puts +d at node a and -d at node b (going round a node the jumps of the lines meeting
there add up to zero; at a fixed boundary node the outside does not move). The optimum is the
load factor lambda, an upper bound on the true collapse factor. One more column with a large
cost M and only the work-row entry keeps every restricted LP feasible: lambda >= M means no
mechanism was found (reported as infinity).

Column generation (adaptive nodal connection) [pub, Gilbert & Tyas 2003 for trusses; Smith &
Gilbert 2007 section 5 for DLO]: start with short lines, solve, price every candidate
(reduced cost r = c - A^T y with the duals y), add the most negative per unit length, re-solve
from the previous basis, until no candidate has r < 0 within tolerance. The final answer is
then optimal over *all* candidates.
"""

from __future__ import annotations

import time
from dataclasses import dataclass

import numpy as np

from screening.model.errors import EngineError

NO_MECHANISM_COST = 1e7
"""Cost M of the artificial column (lambda at or above it: no mechanism)."""
REDUCED_COST_TOL = 1e-7
MAX_ROUNDS = 60
MULTIPLIER_CAP = 1e3
"""Upper bound on every plastic multiplier in the highspy LP. The work of the factored loads
is 1, so a mechanism's multipliers are of the order of 1/(its gravity work): ~1e-3 on the
walls. A collapse (lambda <= 0), unbounded without the cap, then ends as an optimum at the cap
with a negative objective, which the dual simplex reaches in a third to a half of the
iterations it needs to prove an LP unbounded (bench_mechanism.py item 4); with the cap inactive
the optimum, its duals and the pricing are those of the LP without it (an LP optimum inside
the box is optimal without the box). A positive optimum touching the cap raises it x1000 and
solves again."""


@dataclass(frozen=True)
class Columns:
    """Every candidate column (two per line), arrays (k,)."""

    cost: np.ndarray
    work: np.ndarray
    dx: np.ndarray
    dy: np.ndarray
    row_a: np.ndarray
    """Row of node a's x condition, -1 where node a is free (y condition is row_a + 1)."""
    row_b: np.ndarray
    probe: np.ndarray
    """Coefficient of dx in the footing row (0 or 1)."""
    length_m: np.ndarray
    n_rows: int
    work_row: int
    probe_row: int
    """-1 without a footing."""

    @property
    def n(self) -> int:
        return int(self.cost.shape[0])

    def matrix(self, idx: np.ndarray):
        """CSC (starts, indices, values) of the columns idx."""
        k = idx.size
        rows = np.full((k, 6), -1, dtype=np.int64)
        vals = np.zeros((k, 6))
        ra, rb = self.row_a[idx], self.row_b[idx]
        dx, dy = self.dx[idx], self.dy[idx]
        rows[:, 0] = ra
        rows[:, 1] = np.where(ra >= 0, ra + 1, -1)
        rows[:, 2] = rb
        rows[:, 3] = np.where(rb >= 0, rb + 1, -1)
        vals[:, :4] = np.stack([dx, dy, -dx, -dy], 1)
        rows[:, 4] = np.where(self.work[idx] != 0.0, self.work_row, -1)
        vals[:, 4] = self.work[idx]
        if self.probe_row >= 0:
            rows[:, 5] = np.where(self.probe[idx] != 0.0, self.probe_row, -1)
            vals[:, 5] = self.probe[idx] * dx
        keep = (rows >= 0) & (vals != 0.0)
        counts = keep.sum(axis=1)
        starts = np.concatenate([[0], np.cumsum(counts)[:-1]]).astype(np.int32)
        return starts, rows[keep].astype(np.int32), vals[keep], int(counts.sum())

    def reduced_cost(self, dual: np.ndarray) -> np.ndarray:
        """c - A^T y for every column."""
        y = np.append(dual, 0.0)
        free = y.size - 1
        ra = np.where(self.row_a >= 0, self.row_a, free)
        ra1 = np.where(self.row_a >= 0, self.row_a + 1, free)
        rb = np.where(self.row_b >= 0, self.row_b, free)
        rb1 = np.where(self.row_b >= 0, self.row_b + 1, free)
        ay = (y[ra] - y[rb]) * self.dx + (y[ra1] - y[rb1]) * self.dy
        ay += y[self.work_row] * self.work
        if self.probe_row >= 0:
            ay += y[self.probe_row] * self.probe * self.dx
        return self.cost - ay


@dataclass
class Outcome:
    """One LP answer over all candidates (after column generation)."""

    value: float
    multipliers: np.ndarray
    """p of every candidate column (0 where not in the final LP)."""
    in_model: np.ndarray
    rounds: int
    simplex_iterations: int
    seconds: float
    solver: str
    basis: object = None
    dual: np.ndarray | None = None
    """Row duals of the final LP (they price every candidate at >= 0)."""


def _unbounded(
    cols: Columns, in_model: np.ndarray, rounds: int, seconds: float, solver: str, iterations=0
):
    """The outcome of an unbounded LP: collapse whatever the load factor (lambda = 0).

    The LP is always feasible (the artificial column), so unbounded means a combination of
    lines with no work of the factored loads and negative cost: a mechanism that the fixed
    loads (pore pressures) drive by themselves added to one that the factored loads drive.
    No positive factor on the factored loads holds the section, and with more candidate
    lines the minimum can only fall, so the answer over all candidates is the same.
    """
    return Outcome(0.0, np.zeros(cols.n), in_model, rounds, iterations, seconds, solver, None, None)


COLLAPSE_TOL = 1e-9


def _collapsed(objective: float) -> bool:
    """A restricted LP already at an objective <= 0: collapse, and more lines can only
    lower it, so column generation stops there. With the artificial column at a share a of
    the work (cost 1e7 a >= 0) the real lines p then do work 1 - a at a cost below
    -1e7 a: for a < 1 the mechanism p / (1 - a) has lambda < 0; for a = 1, p is a direction
    of no work and negative cost, which makes the LP without the cap unbounded (_unbounded)."""
    return objective <= COLLAPSE_TOL


def _status_error(status: str) -> EngineError:
    return EngineError(
        f"mechanism check: the linear programme ended with status '{status}' instead of "
        "optimal, so no factor is reported (try a coarser or finer grid, or check the inputs)"
    )


def _select(cols: Columns, r: np.ndarray, in_model: np.ndarray, batch: int) -> np.ndarray:
    scale = np.abs(cols.cost) + 1e-12
    score = r / cols.length_m
    bad = (~in_model) & (r < -REDUCED_COST_TOL * (1.0 + scale))
    cand = np.flatnonzero(bad)
    if cand.size > batch:
        cand = cand[np.argpartition(score[cand], batch)[:batch]]
    return cand


def _batch(current: int) -> int:
    return max(300, current // 3)


def solve_highs(cols: Columns, start: np.ndarray, warm=None) -> Outcome:
    """Column generation with highspy, re-solving from the previous basis after each round."""
    import highspy

    t0 = time.perf_counter()
    h = _new_highs(highspy)
    h.setOptionValue("presolve", "off")
    lower = np.zeros(cols.n_rows)
    lower[cols.work_row] = 1.0
    h.addRows(
        cols.n_rows,
        lower,
        lower.copy(),
        0,
        np.zeros(0, np.int32),
        np.zeros(0, np.int32),
        np.zeros(0),
    )
    h.addCols(
        1,
        np.array([NO_MECHANISM_COST]),
        np.zeros(1),
        np.array([np.inf]),
        1,
        np.zeros(1, np.int32),
        np.array([cols.work_row], np.int32),
        np.ones(1),
    )
    order = [np.flatnonzero(start)]
    in_model = start.copy()
    cap = MULTIPLIER_CAP
    _add(h, cols, order[0], cap)
    if warm is not None:
        _set_warm_basis(h, warm, order[0])
    iterations = 0
    rounds = 0
    while True:
        h.run()
        status = h.getModelStatus()
        unbounded = (
            highspy.HighsModelStatus.kUnbounded,
            highspy.HighsModelStatus.kUnboundedOrInfeasible,
        )
        if status != highspy.HighsModelStatus.kOptimal and status not in unbounded:
            # a stale basis can leave the solver stuck: once more from scratch, then give up
            h.clearSolver()
            h.run()
            status = h.getModelStatus()
        if status in unbounded:
            seconds = time.perf_counter() - t0
            return _unbounded(cols, in_model, rounds + 1, seconds, "highspy", iterations)
        if status != highspy.HighsModelStatus.kOptimal:
            raise _status_error(h.modelStatusToString(status))
        iterations += int(h.getInfo().simplex_iteration_count)
        objective = h.getInfo().objective_function_value
        x = np.asarray(h.getSolution().col_value)
        if objective > COLLAPSE_TOL and x.size > 1 and x[1:].max() >= cap * (1.0 - 1e-9):
            cap = _raise_cap(h, cap)
            continue
        rounds += 1
        dual = np.asarray(h.getSolution().row_dual)
        if _collapsed(objective):
            # no mechanism is reported (its multipliers sit at the cap); the next LP starts
            # from every line of this one (in_model)
            seconds = time.perf_counter() - t0
            return _unbounded(cols, in_model, rounds, seconds, "highspy", iterations)
        new = _select(cols, cols.reduced_cost(dual), in_model, _batch(int(in_model.sum())))
        if new.size == 0 or rounds >= MAX_ROUNDS:
            break
        _add(h, cols, new, cap)
        in_model[new] = True
        order.append(new)
    x = np.asarray(h.getSolution().col_value)
    ids = np.concatenate(order)
    p = np.zeros(cols.n)
    p[ids] = x[1:]
    basis = h.getBasis()
    value = float(h.getInfo().objective_function_value)
    if rounds >= MAX_ROUNDS:
        raise EngineError(
            f"mechanism check: column generation did not settle in {MAX_ROUNDS} rounds"
        )
    return Outcome(
        _value(value, x[0]),
        p,
        in_model,
        rounds,
        iterations,
        time.perf_counter() - t0,
        "highspy",
        (ids, basis),
        dual,
    )


def _new_highs(highspy):
    """A silent HiGHS instance. The core class logs nothing before ``output_flag`` is off;
    the public wrapper prints a banner to stdout on its first construction, which would spoil
    the command line's JSON output."""
    core = getattr(getattr(highspy, "_core", None), "_Highs", None)
    h = core() if core is not None else highspy.Highs()
    h.setOptionValue("output_flag", False)
    return h


def _set_warm_basis(h, warm, ids: np.ndarray) -> None:
    """Start from an earlier LP's basis: the candidate set only grows, so its columns are all
    here; the others start non-basic at zero (still a basis: the rows are the same)."""
    import highspy

    old_ids, basis = warm
    status = list(basis.col_status)
    where = np.searchsorted(ids, old_ids)
    if where.size and (where.max() >= ids.size or not np.array_equal(ids[where], old_ids)):
        return
    new = np.full(ids.size + 1, highspy.HighsBasisStatus.kLower, dtype=object)
    new[0] = status[0]
    new[1 + where] = np.array(status[1:], dtype=object)
    start = highspy.HighsBasis()  # a new one: the old basis may start another LP too
    start.col_status = new.tolist()
    start.row_status = list(basis.row_status)
    start.valid = True
    h.setBasis(start)


def _raise_cap(h, cap: float) -> float:
    """Every multiplier's upper bound x1000 (infinite past 1e12): see MULTIPLIER_CAP."""
    cap = cap * 1e3 if cap < 1e12 else np.inf
    n = h.getNumCol() - 1
    h.changeColsBounds(n, np.arange(1, n + 1, dtype=np.int32), np.zeros(n), np.full(n, cap))
    return cap


def _add(h, cols: Columns, idx: np.ndarray, cap: float = np.inf) -> None:
    if idx.size == 0:
        return
    starts, index, values, nnz = cols.matrix(idx)
    h.addCols(
        idx.size,
        cols.cost[idx],
        np.zeros(idx.size),
        np.full(idx.size, cap),
        nnz,
        starts,
        index,
        values,
    )


def _value(objective: float, artificial: float) -> float:
    return np.inf if artificial > 0.5 else objective


def solve_scipy(cols: Columns, start: np.ndarray) -> Outcome:
    """The same column generation with scipy.optimize.linprog (HiGHS inside, cold starts)."""
    from scipy.optimize import linprog
    from scipy.sparse import csc_matrix

    t0 = time.perf_counter()
    in_model = start.copy()
    rounds = 0
    iterations = 0
    b = np.zeros(cols.n_rows)
    b[cols.work_row] = 1.0
    while True:
        ids = np.flatnonzero(in_model)
        starts, index, values, nnz = cols.matrix(ids)
        indptr = np.append(starts, nnz)
        a = csc_matrix((values, index, indptr), shape=(cols.n_rows, ids.size))
        art = csc_matrix(([1.0], ([cols.work_row], [0])), shape=(cols.n_rows, 1))
        from scipy.sparse import hstack

        res = linprog(
            np.concatenate([[NO_MECHANISM_COST], cols.cost[ids]]),
            A_eq=hstack([art, a]).tocsc(),
            b_eq=b,
            bounds=(0, None),
            method="highs",
        )
        if res.status == 3:
            return _unbounded(cols, in_model, rounds + 1, time.perf_counter() - t0, "scipy")
        if res.status != 0:
            raise _status_error(res.message)
        rounds += 1
        iterations += int(getattr(res, "nit", 0) or 0)
        new = _select(cols, cols.reduced_cost(res.eqlin.marginals), in_model, _batch(ids.size))
        if new.size == 0 or rounds >= MAX_ROUNDS:
            break
        in_model[new] = True
    p = np.zeros(cols.n)
    p[ids] = res.x[1:]
    if rounds >= MAX_ROUNDS:
        raise EngineError(
            f"mechanism check: column generation did not settle in {MAX_ROUNDS} rounds"
        )
    return Outcome(
        _value(float(res.fun), res.x[0]),
        p,
        in_model,
        rounds,
        iterations,
        time.perf_counter() - t0,
        "scipy",
        None,
        np.asarray(res.eqlin.marginals),
    )
