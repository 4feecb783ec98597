"""Parts of the mechanism check: candidate lines, LP status and duals, layers, inputs.

Sources: Smith & Gilbert (2007), Proc. R. Soc. A 463, section 3 (candidate lines are the
primitive node connections, none overlapping, each inside one material); LP duality (any LP
text, e.g. Chvatal 1983): at an optimum every reduced cost c - A^T y is >= 0 and basic
columns have 0; scipy.optimize.linprog (HiGHS) as an independent reference solver; the pullout
and rupture rule T = min(rupture, tail pullout, front pullout + facing) [mem, GEC 11 vol. II
ch. 9, the same rule as the slip-circle check].
"""

from __future__ import annotations

import subprocess
import sys

import numpy as np
import pytest

from screening.engine.mechanism.grid import candidate_lines, make_nodes
from screening.engine.mechanism.layout import build_layout, columns
from screening.engine.mechanism.lp import Columns, solve_highs, solve_scipy
from screening.engine.mechanism.reference_problems import footing_problem, slope_problem
from screening.engine.mechanism.reinforcement import layer_hold_kn_m
from screening.engine.mechanism.section import (
    MechanismLayer,
    MechanismSection,
    SoilStrength,
    wall_problem,
)
from screening.model.errors import EngineError, InputError


def _wall(**kw) -> MechanismSection:
    base = dict(
        design_height_m=4.0,
        embedment_m=0.6,
        length_m=3.0,
        foundation=SoilStrength(19.0, 0.0, 30.0),
        reinforced=SoilStrength(20.0, 0.0, 34.0),
        retained=SoilStrength(19.0, 0.0, 30.0),
        layers=tuple(MechanismLayer(y, 30.0, 20.0, 30.0) for y in (0.375, 1.125, 1.875, 2.625)),
        backslope_deg=14.0,
        toe_slope_deg=18.43,
        toe_slope_fall_m=3.0,
    )
    base.update(kw)
    return MechanismSection(**base)


@pytest.fixture(scope="module")
def wall_lines():
    problem = wall_problem(_wall())
    nodes = make_nodes(problem, 0.9)
    return problem, nodes, candidate_lines(problem, nodes)


def test_candidate_lines_never_overlap_nor_pass_through_nodes(wall_lines):
    """Smith & Gilbert (2007) section 3: primitive connections only. Brute force: no node
    lies strictly inside any candidate, so no two collinear candidates overlap."""
    _, nodes, lines = wall_lines
    geo = np.unique(lines.geometry, return_index=True)[1]
    a, b = lines.a[geo], lines.b[geo]
    ax, ay, bx, by = nodes.x_m[a], nodes.y_m[a], nodes.x_m[b], nodes.y_m[b]
    length = np.hypot(bx - ax, by - ay)
    for k in range(nodes.n):
        px, py = nodes.x_m[k], nodes.y_m[k]
        cross = (bx - ax) * (py - ay) - (by - ay) * (px - ax)
        t = ((px - ax) * (bx - ax) + (py - ay) * (by - ay)) / length**2
        on = (np.abs(cross) / length < 1e-7) & (t > 1e-9) & (t < 1 - 1e-9)
        assert not np.any(on), f"node {k} lies inside a candidate line"
    # one entry per (segment, material): no segment repeated within one material
    pairs = np.stack([lines.a, lines.b, lines.material], 1)
    assert np.unique(pairs, axis=0).shape[0] == lines.n


def test_candidate_lines_stay_in_one_material(wall_lines):
    """Each candidate lies inside the band(s) of its own material: points along it are
    inside one of that material's bands (Smith & Gilbert 2007: one strength per line)."""
    problem, nodes, lines = wall_lines
    bands = problem.band_arrays()
    t = np.linspace(0.02, 0.98, 9)[:, None]
    x = nodes.x_m[lines.a] + t * (nodes.x_m[lines.b] - nodes.x_m[lines.a])
    y = nodes.y_m[lines.a] + t * (nodes.y_m[lines.b] - nodes.y_m[lines.a])
    xb = x[..., None]
    inside = (
        (xb >= bands.x0 - 1e-6)
        & (xb <= bands.x1 + 1e-6)
        & (y[..., None] >= bands.bottom(x) - 1e-6)
        & (y[..., None] <= bands.top(x) + 1e-6)
        & (bands.material[None, None, :] == lines.material[None, :, None])
    )
    assert np.all(np.any(inside, axis=-1))


def test_layers_lie_between_node_rows(wall_lines):
    """The issue's rule: no node on a reinforcement layer inside the reinforced zone."""
    problem, nodes, _ = wall_lines
    for lay in problem.layers:
        on = (np.abs(nodes.y_m - lay.level_m) < 1e-6) & (nodes.x_m >= 0) & (nodes.x_m <= 3.0)
        assert not np.any(on)


def _unbounded() -> Columns:
    """One row (the work row) and a column of negative cost that touches no row: the LP
    min -p, p >= 0 is unbounded."""
    return Columns(
        cost=np.array([-1.0]),
        work=np.array([0.0]),
        dx=np.array([0.0]),
        dy=np.array([0.0]),
        row_a=np.array([-1]),
        row_b=np.array([-1]),
        probe=np.array([0.0]),
        length_m=np.array([1.0]),
        n_rows=1,
        work_row=0,
        probe_row=-1,
    )


@pytest.mark.parametrize("solve", [solve_highs, solve_scipy])
def test_unbounded_lp_is_collapse(solve):
    """LP duality (common practice, no source): the LP is always feasible, so unbounded
    means a direction of zero work and negative cost: no positive load factor holds the
    section, and it is reported as collapse (lambda = 0) with no mechanism, not a number
    of the solver's."""
    out = solve(_unbounded(), np.array([True]))
    assert out.value == 0.0
    assert not out.multipliers.any()


def test_lp_status_is_checked(monkeypatch):
    """An LP that ends neither optimal nor unbounded (here: an iteration limit of 0) is an
    EngineError that says so, never a number."""
    from screening.engine.mechanism import lp

    original = lp._new_highs

    def limited(highspy):
        h = original(highspy)
        h.setOptionValue("simplex_iteration_limit", 0)
        return h

    monkeypatch.setattr(lp, "_new_highs", limited)
    layout = build_layout(footing_problem(), 80)
    cols = columns(layout, 1.0, ("footing",))
    with pytest.raises(EngineError, match="instead of optimal"):
        solve_highs(cols, np.repeat(layout.lines.initial, 2))


def test_duals_prove_optimality_over_all_candidates():
    """LP duality: after column generation the final duals price every candidate at >= 0
    (within tolerance) and the columns carrying the mechanism at 0; and an independent solve
    of the LP with *all* candidates (scipy.optimize.linprog) has the same optimum."""
    from scipy.optimize import linprog
    from scipy.sparse import csc_matrix, hstack

    layout = build_layout(footing_problem(), 120)
    cols = columns(layout, 1.0, ("footing",))
    out = solve_highs(cols, np.repeat(layout.lines.initial, 2))
    assert out.in_model.sum() < cols.n  # column generation left candidates out
    r = cols.reduced_cost(out.dual)
    scale = np.abs(cols.cost).max()
    assert r.min() >= -1e-6 * scale
    assert np.all(np.abs(r[out.multipliers > 1e-9]) < 1e-6 * scale)
    ids = np.arange(cols.n)
    starts, index, values, nnz = cols.matrix(ids)
    a = csc_matrix((values, index, np.append(starts, nnz)), shape=(cols.n_rows, ids.size))
    art = csc_matrix(([1.0], ([cols.work_row], [0])), shape=(cols.n_rows, 1))
    b = np.zeros(cols.n_rows)
    b[cols.work_row] = 1.0
    res = linprog(
        np.concatenate([[1e7], cols.cost]),
        A_eq=hstack([art, a]).tocsc(),
        b_eq=b,
        bounds=(0, None),
        method="highs",
    )
    assert res.status == 0
    assert res.fun == pytest.approx(out.value, rel=1e-7)


def test_scipy_fallback_matches_highspy():
    """The fallback (scipy.optimize.linprog, cold re-solves) gives the same optimum."""
    problem = slope_problem(
        height_m=1.0, run_m=0.0, unit_weight_kn_m3=1.0, cohesion_kpa=1.0, friction_deg=0.0
    )
    layout = build_layout(problem, 120)
    cols = columns(layout, 1.0, ("weight",))
    start = np.repeat(layout.lines.initial, 2)
    assert solve_scipy(cols, start).value == pytest.approx(solve_highs(cols, start).value, 1e-7)


def test_layer_hold_is_the_least_of_three():
    """T(x) = min(rupture, p (x1 - x), p (x - x0) + facing) [mem, GEC 11 vol. II ch. 9]."""
    x = np.array([-0.1, 0.2, 1.5, 2.9, 3.1])
    t = layer_hold_kn_m(x, 0.0, 3.0, 25.0, 10.0, 5.0)
    assert t == pytest.approx([0.0, 7.0, 15.0, 1.0, 0.0])


def test_bad_section_field_is_named():
    """Bad input names the segment and the field and says what would be valid."""
    with pytest.raises(InputError, match="segment W-3, length_m: .*above 0 m"):
        _wall(length_m=0.0, segment_id="W-3")
    with pytest.raises(InputError, match="water_level_m"):
        _wall(water_level_m=1.0)


def test_default_firm_depth():
    """Default depth to the firm layer: 2H, and at least H below a toe slope's foot
    (METHOD.md in screening/engine/mechanism)."""
    assert _wall(toe_slope_deg=0.0, toe_slope_fall_m=0.0).firm_depth_m == pytest.approx(8.0)
    assert _wall(toe_slope_fall_m=6.0).firm_depth_m == pytest.approx(max(8.0, 6.0 - 0.6 + 4.0))


def test_importing_the_mechanism_check_loads_no_solver():
    """Start-up speed: scipy and highspy are imported only when a factor is computed."""
    code = (
        "import sys, screening.engine.mechanism.solve\n"
        "print('highspy' in sys.modules, 'scipy.optimize' in sys.modules)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.split() == ["False", "False"], out.stderr


def test_slope_from_one_lp_matches_finite_differences():
    """LP sensitivity (the envelope theorem, any LP text; common practice, no source): with
    the optimal multipliers and duals held, d lambda / dF from one LP equals the slope of
    lambda(F) measured by solving the LP again at F (1 +- 1 %), away from a kink."""
    from screening.engine.mechanism.solve import GRAVITY, _Runner

    run = _Runner(build_layout(wall_problem(_wall()), 150), "highspy", GRAVITY)
    f = 1.1
    lam, k = run.point(f)
    assert 0.0 < lam < 1e3
    up, down = run(f * 1.01), run(f / 1.01)
    measured = -np.log(up / down) / np.log(1.01**2)
    assert k == pytest.approx(measured, rel=0.05)


def test_warm_start_and_multiplier_cap_keep_the_optimum():
    """Any start of the simplex method ends at the same optimum (LP duality): the LP of a new
    F started from the last LP's columns and basis, or with the multipliers capped, gives the
    lambda of a cold, uncapped solve (scipy.optimize.linprog as the independent solver)."""
    layout = build_layout(wall_problem(_wall()), 150)
    start = np.repeat(layout.lines.initial, 2)
    first = solve_highs(columns(layout, 1.0, ("weight", "dead", "live")), start)
    cols = columns(layout, 1.05, ("weight", "dead", "live"))
    warm = solve_highs(cols, first.in_model, first.basis)
    cold = solve_scipy(cols, start)
    assert warm.value == pytest.approx(cold.value, rel=1e-7)


def test_the_race_over_cases_keeps_the_least_factor():
    """least_strength_factor gives the least F of several sections as strength_factor gives
    it for each (it only stops the others early): a stronger layer grade never lowers F
    (upper-bound theorem), so the weak section's F is the least."""
    from screening.engine.mechanism.solve import least_strength_factor, strength_factor

    weak = _wall(layers=tuple(MechanismLayer(y, 15.0, 20.0, 15.0) for y in (0.375, 1.125)))
    strong = _wall()
    race = least_strength_factor([strong, weak], [None, None], nodes=150)
    alone = strength_factor(weak, nodes=150)
    assert race[0] is None
    assert race[1].factor == pytest.approx(alone.factor, rel=1e-9)
    assert strength_factor(strong, nodes=150).factor >= alone.factor
