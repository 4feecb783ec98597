"""Work of the loads on each candidate line: self weight and surface pressures, pore water.

Self weight by lines [pub, Smith & Gilbert 2007, section 4]: the velocity of a point is the
sum of the jumps crossed on the way up from the fixed base, so the work of a vertical load
field is a sum over lines: for a line with its left end ``a`` (x_a < x_b) and jump
``d = v(above) - v(below)``, work rate = -d_y * G, where G (kN/m) is the integral over the
line's horizontal span of the load resting on it: the soil column up to the ground plus the
surface pressure. Vertical lines carry no column. Within one band the column above the line
is the least of two linear functions of x (band thickness, and top minus the line), so its
integral is exact in closed form, band by band (no sampling).

Pore water: u = 9.81 (h_w - y) kPa below the water table does work u * n on a line that opens
by n; per unit opening that is U = integral of u along the line (kN/m), exact for a straight
line and a level table.
"""

from __future__ import annotations

import numpy as np

from screening.engine.mechanism.grid import Lines, Nodes
from screening.engine.mechanism.problem import (
    FOOTING,
    LOAD_KINDS,
    TOL_M,
    WATER_UNIT_WEIGHT_KN_M3,
    WEIGHT,
    Problem,
)


def _overlap(xa, xb, x0: float, x1: float) -> np.ndarray:
    return np.maximum(np.minimum(xb, x1) - np.maximum(xa, x0), 0.0)


def _at(u, w, x0: float, x1: float, y0: float, y1: float):
    """A band edge's level at u and at w (the edge runs from (x0, y0) to (x1, y1))."""
    k = (y1 - y0) / (x1 - x0)
    return y0 + k * (u - x0), y0 + k * (w - x0)


def _positive_min_integral(u, w, a_u, a_w, b_u, b_w) -> np.ndarray:
    """Integral over [u, w] of max(0, min(A, B)), A and B linear with the values given at u
    and w (arrays of one shape). The integrand is linear between the points where A = B,
    A = 0 or B = 0, so the midpoint rule on those pieces is exact."""
    width = w - u
    safe = np.where(width > 0.0, width, 1.0)

    def zero(g_u, g_w):
        d = g_u - g_w
        t = np.where(np.abs(d) > 1e-300, g_u / np.where(d != 0.0, d, 1.0), 0.0)
        return u + width * np.clip(t, 0.0, 1.0)

    pts = np.sort(
        np.stack([u, zero(a_u - b_u, a_w - b_w), zero(a_u, a_w), zero(b_u, b_w), w], -1), -1
    )
    mid = 0.5 * (pts[..., 1:] + pts[..., :-1])
    t = (mid - u[..., None]) / safe[..., None]
    a = a_u[..., None] + (a_w - a_u)[..., None] * t
    b = b_u[..., None] + (b_w - b_u)[..., None] * t
    return np.sum(np.diff(pts, axis=-1) * np.maximum(np.minimum(a, b), 0.0), axis=-1)


def line_loads(problem: Problem, nodes: Nodes, lines: Lines) -> dict[str, np.ndarray]:
    """G (kN/m) of every line for each load kind (problem.LOAD_KINDS), (lines,) arrays.

    Soil: for each band over the part of the line's span inside it, the column of the band
    above the line is max(0, min(top - bottom, top - y_line)) thick, the least of two linear
    functions (:func:`_positive_min_integral`, exact). Surface pressures and the footing's
    unit pressure: pressure times the overlap of the spans."""
    geo, first = np.unique(lines.geometry, return_index=True)
    a, b = lines.a[first], lines.b[first]
    xa, ya, xb, yb = nodes.x_m[a], nodes.y_m[a], nodes.x_m[b], nodes.y_m[b]
    dx = xb - xa
    slope = (yb - ya) / np.where(dx > TOL_M, dx, 1.0)
    bands = problem.band_arrays()
    out = {kind: np.zeros(geo.size) for kind in LOAD_KINDS}
    for k in range(bands.x0.size):
        x0, x1 = bands.x0[k], bands.x1[k]
        u, w = np.maximum(xa, x0), np.minimum(xb, x1)
        on = np.flatnonzero((w - u > TOL_M) & (dx > TOL_M))
        if on.size == 0:
            continue
        u, w = u[on], w[on]
        top_u, top_w = _at(u, w, x0, x1, bands.top0[k], bands.top1[k])
        bot_u, bot_w = _at(u, w, x0, x1, bands.bottom0[k], bands.bottom1[k])
        y_u = ya[on] + slope[on] * (u - xa[on])
        y_w = ya[on] + slope[on] * (w - xa[on])
        out[WEIGHT][on] += bands.unit_weight[k] * _positive_min_integral(
            u, w, top_u - bot_u, top_w - bot_w, top_u - y_u, top_w - y_w
        )
    for s in problem.surface_loads:
        out[s.kind] += s.pressure_kpa * _overlap(xa, xb, s.x0_m, s.x1_m)
    if problem.footing is not None:
        out[FOOTING] += _overlap(xa, xb, problem.footing.x0_m, problem.footing.x1_m)
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
