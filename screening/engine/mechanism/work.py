"""Work of the loads on each candidate line: self weight and surface pressures, pore water.

Self weight by lines [pub, Smith & Gilbert 2007, section 4]: the velocity of a point is the
sum of the jumps crossed on the way up from the fixed base, so the work of a vertical load
field is a sum over lines: for a line with its left end ``a`` (x_a < x_b) and jump
``d = v(above) - v(below)``, work rate = -d_y * G, where G (kN/m) is the integral over the
line's horizontal span of the load resting on it: the soil column up to the ground plus the
surface pressure. Vertical lines carry no column. The integrand is piecewise linear in x with
kinks only at band edges, load edges and where the line crosses a band boundary, so the
midpoint rule on those pieces is exact.

Pore water: u = 9.81 (h_w - y) kPa below the water table does work u * n on a line that opens
by n; per unit opening that is U = integral of u along the line (kN/m), exact for a straight
line and a level table.
"""

from __future__ import annotations

import numpy as np

from screening.engine.mechanism.grid import Lines, Nodes
from screening.engine.mechanism.problem import (
    LOAD_KINDS,
    TOL_M,
    WATER_UNIT_WEIGHT_KN_M3,
    Problem,
    column_load,
)

_CHUNK = 8000


def _cuts(problem: Problem, xa, ya, xb, yb) -> np.ndarray:
    """x where the load on a line can kink, (p, k), clipped to each line's span."""
    bands = problem.band_arrays()
    slope = (yb - ya) / np.where(xb - xa > TOL_M, xb - xa, 1.0)
    parts = [np.broadcast_to(problem.breaks_m, (xa.size, problem.breaks_m.size))]
    width = bands.x1 - bands.x0
    for b0, b1 in ((bands.bottom0, bands.bottom1), (bands.top0, bands.top1)):
        k = (b1 - b0) / width
        denom = slope[:, None] - k[None, :]
        safe = np.where(np.abs(denom) > 1e-12, denom, 1.0)
        xc = b0[None] - k[None] * bands.x0[None] - ya[:, None] + slope[:, None] * xa[:, None]
        parts.append(np.where(np.abs(denom) > 1e-12, xc / safe, xa[:, None]))
    parts += [xa[:, None], xb[:, None]]
    cuts = np.concatenate(parts, axis=1)
    return np.sort(np.clip(cuts, xa[:, None], xb[:, None]), axis=1)


def line_loads(problem: Problem, nodes: Nodes, lines: Lines) -> dict[str, np.ndarray]:
    """G (kN/m) of every line for each load kind (problem.LOAD_KINDS), (lines,) arrays."""
    geo, first = np.unique(lines.geometry, return_index=True)
    a, b = lines.a[first], lines.b[first]
    xa, ya, xb, yb = nodes.x_m[a], nodes.y_m[a], nodes.x_m[b], nodes.y_m[b]
    out = {kind: np.zeros(geo.size) for kind in LOAD_KINDS}
    for s in range(0, geo.size, _CHUNK):
        sl = slice(s, s + _CHUNK)
        cuts = _cuts(problem, xa[sl], ya[sl], xb[sl], yb[sl])
        mid = 0.5 * (cuts[:, 1:] + cuts[:, :-1])
        width = np.diff(cuts, axis=1)
        dx = xb[sl] - xa[sl]
        slope = (yb[sl] - ya[sl]) / np.where(dx > TOL_M, dx, 1.0)
        ymid = ya[sl, None] + slope[:, None] * (mid - xa[sl, None])
        loads = column_load(problem, mid, ymid)
        for kind in LOAD_KINDS:
            out[kind][sl] = np.sum(width * loads[kind], axis=1)
    position = np.searchsorted(geo, lines.geometry)
    return {kind: g[position] for kind, g in out.items()}


def pore_integral(problem: Problem, nodes: Nodes, lines: Lines) -> np.ndarray:
    """U = integral of u along each line (kN/m): u = gamma_w max(h_w - y, 0)."""
    hw = problem.water_level_m
    if not np.isfinite(hw):
        return np.zeros(lines.n)
    d1 = hw - nodes.y_m[lines.a]
    d2 = hw - nodes.y_m[lines.b]
    p1, p2 = np.maximum(d1, 0.0), np.maximum(d2, 0.0)
    diff = d1 - d2
    level = np.abs(diff) < 1e-9
    mean = np.where(level, p1, (p1**2 - p2**2) / (2.0 * np.where(level, 1.0, diff)))
    return WATER_UNIT_WEIGHT_KN_M3 * lines.length_m * mean
