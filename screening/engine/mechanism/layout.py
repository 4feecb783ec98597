"""The discretised problem: nodes, candidate lines and what each line costs and works.

Everything here is built once per problem and grid (``build_layout``); a strength factor and
a choice of factored loads then give the LP columns (``columns``) cheaply, so the root search
on the strength factor rebuilds no geometry.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from screening.engine.mechanism.grid import Lines, Nodes, candidate_lines, nodes_for_count
from screening.engine.mechanism.lp import Columns
from screening.engine.mechanism.problem import LOAD_KINDS, TOL_M, Problem
from screening.engine.mechanism.reinforcement import crossing_hold, extension_sign
from screening.engine.mechanism.work import line_loads, pore_integral


@dataclass(frozen=True)
class Layout:
    problem: Problem
    nodes: Nodes
    lines: Lines
    cohesion_kpa: np.ndarray
    tan_phi: np.ndarray
    loads: dict[str, np.ndarray]
    pore_kn_m: np.ndarray
    hold_kn_m: np.ndarray
    probe: np.ndarray
    node_row: np.ndarray
    n_rows: int
    work_row: int
    probe_row: int


def probe_x(problem: Problem, nodes: Nodes) -> float:
    """An x under the footing that is not a node column (for its horizontal velocity)."""
    f = problem.footing
    centre = 0.5 * (f.x0_m + f.x1_m)
    cols = nodes.columns_m
    j = int(np.clip(np.searchsorted(cols, centre), 1, cols.size - 1))
    return 0.5 * (cols[j - 1] + cols[j])


_GRIDS: dict[tuple, tuple[Nodes, Lines]] = {}
GRIDS_KEPT = 4
"""Grids kept for sections of the same geometry (the cases of one segment differ only in
their soils' strengths and the water: the same nodes and lines serve them all)."""


def _grid(problem: Problem, target_nodes: int) -> tuple[Nodes, Lines]:
    """Nodes and candidate lines, which depend on the geometry only: the bands' outlines and
    materials' places, the refinement, the layers' levels, held faces, footing and surface
    load edges (the breaks), and the node count."""
    key = (
        problem.bands,
        problem.refinement,
        tuple(lay.level_m for lay in problem.layers),
        problem.held_faces,
        problem.footing,
        tuple((s.x0_m, s.x1_m) for s in problem.surface_loads),
        len(problem.materials),
        int(target_nodes),
    )
    grid = _GRIDS.get(key)
    if grid is None:
        nodes = nodes_for_count(problem, target_nodes)
        grid = (nodes, candidate_lines(problem, nodes))
        for part in grid:  # shared between layouts: read-only
            for value in vars(part).values():
                if isinstance(value, np.ndarray):
                    value.setflags(write=False)
        while len(_GRIDS) >= GRIDS_KEPT:
            _GRIDS.pop(next(iter(_GRIDS)))
        _GRIDS[key] = grid
    return grid


def build_layout(problem: Problem, target_nodes: int) -> Layout:
    nodes, lines = _grid(problem, target_nodes)
    mats = problem.materials
    cohesion = np.array([mats[m].cohesion_kpa for m in lines.material])
    tan_phi = np.tan(np.radians(np.array([mats[m].friction_deg for m in lines.material])))
    f = problem.footing
    if f is not None and not f.rough:
        # smooth footing base: lines along it slide freely, no dilation
        xa, xb = nodes.x_m[lines.a], nodes.x_m[lines.b]
        under = (xa >= f.x0_m - TOL_M) & (xb <= f.x1_m + TOL_M)
        along = under & _is_top(nodes, lines.a) & _is_top(nodes, lines.b)
        cohesion = np.where(along, 0.0, cohesion)
        tan_phi = np.where(along, 0.0, tan_phi)
    constrained = ~nodes.free
    node_row = np.full(nodes.n, -1, dtype=np.int64)
    node_row[constrained] = 2 * np.arange(int(constrained.sum()))
    work_row = 2 * int(constrained.sum())
    probe = np.zeros(lines.n)
    probe_row = -1
    if f is not None:
        xp = probe_x(problem, nodes)
        probe = ((nodes.x_m[lines.a] < xp) & (nodes.x_m[lines.b] > xp)).astype(np.float64)
        probe_row = work_row + 1
    return Layout(
        problem=problem,
        nodes=nodes,
        lines=lines,
        cohesion_kpa=cohesion,
        tan_phi=tan_phi,
        loads=line_loads(problem, nodes, lines),
        pore_kn_m=pore_integral(problem, nodes, lines),
        hold_kn_m=crossing_hold(problem, nodes, lines),
        probe=probe,
        node_row=node_row,
        n_rows=work_row + (2 if f is not None else 1),
        work_row=work_row,
        probe_row=probe_row,
    )


def _is_top(nodes: Nodes, idx: np.ndarray) -> np.ndarray:
    """Node is the highest of its column (on the ground)."""
    top = np.full(nodes.columns_m.size, -np.inf)
    np.maximum.at(top, nodes.column, nodes.y_m)
    return nodes.y_m[idx] >= top[nodes.column[idx]] - 1e-9


def columns(
    layout: Layout,
    strength_factor: float,
    factored: tuple[str, ...],
    lines_at: np.ndarray | None = None,
) -> Columns:
    """LP columns with every strength divided by ``strength_factor`` (two per line);
    ``lines_at``: only those lines (indices), in that order."""
    for kind in factored:
        if kind not in LOAD_KINDS:
            raise ValueError(f"unknown load kind {kind!r}; valid: {', '.join(LOAD_KINDS)}")
    lines = layout.lines
    at = slice(None) if lines_at is None else np.asarray(lines_at)
    n = lines.n if lines_at is None else at.size
    f = float(strength_factor)
    tan_d = layout.tan_phi[at] / f
    sign = np.array([1.0, -1.0])[None, :]
    cos, sin = lines.cos[at][:, None], lines.sin[at][:, None]
    dx = sign * cos - tan_d[:, None] * sin
    dy = sign * sin + tan_d[:, None] * cos
    stretch = extension_sign(lines)[at][:, None] * dx
    dissipation = (layout.cohesion_kpa[at] / f * lines.length_m[at])[:, None] + (
        layout.hold_kn_m[at] / f
    )[:, None] * np.maximum(stretch, 0.0)
    factored_g = sum((layout.loads[k][at] for k in factored), np.zeros(n))
    fixed_g = sum((layout.loads[k][at] for k in LOAD_KINDS if k not in factored), np.zeros(n))
    work = -dy * factored_g[:, None]
    fixed = -dy * fixed_g[:, None] + (layout.pore_kn_m[at] * tan_d)[:, None]
    ra = layout.node_row[lines.a[at]]
    rb = layout.node_row[lines.b[at]]
    two = np.ones((1, 2))
    return Columns(
        cost=(dissipation - fixed).ravel(),
        work=work.ravel(),
        dx=dx.ravel(),
        dy=dy.ravel(),
        row_a=(ra[:, None] * two).astype(np.int64).ravel(),
        row_b=(rb[:, None] * two).astype(np.int64).ravel(),
        probe=(layout.probe[at][:, None] * two).ravel(),
        length_m=np.repeat(lines.length_m[at], 2),
        n_rows=layout.n_rows,
        work_row=layout.work_row,
        probe_row=layout.probe_row,
    )
