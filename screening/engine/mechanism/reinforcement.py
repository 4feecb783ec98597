"""Dissipation of reinforcement layers cut by a discontinuity.

A horizontal layer from x0 (face end) to x1 (tail end) crossed by a line at x carries at most

    T(x) = min(T_lt, p * (x1 - x), p * (x - x0) + T_c)            (kN/m)

the long-term strength, the pullout of the tail beyond the cut, or the pullout of the face
side plus the facing connection; p is the pullout resistance per metre of anchorage
(F* alpha sigma'v C Rc at the layer, the internal check's own value) [mem, GEC 11 vol. II
ch. 9, the same rule as the slip-circle check in this project]. The layer works only when the
jump stretches it: dissipation T(x) * max(e, 0) with e the jump component along the layer,
positive when the part behind the cut moves away from the part in front. Shear and bending of
the layer are ignored [cp, conservative].

A line can cross several layers; the jump is the same all along it, so its rate is
(sum of T) * max(e, 0). In the LP each line has two plastic multipliers (positive and
negative shear), each with its own fixed jump direction, so max(e, 0) is a constant per
multiplier and the problem stays linear; when both multipliers of a line are positive this
over-counts the layer (max is subadditive), which keeps the result an upper bound.
"""

from __future__ import annotations

import numpy as np

from screening.engine.mechanism.grid import Lines, Nodes
from screening.engine.mechanism.problem import Problem


def layer_hold_kn_m(
    x_m: np.ndarray,
    x0_m: float,
    x1_m: float,
    strength_kn_m: float,
    pullout_kn_m2: float,
    connection_kn_m: float,
) -> np.ndarray:
    """T(x) of one layer (module docstring); 0 outside the layer."""
    x = np.asarray(x_m, dtype=np.float64)
    tail = pullout_kn_m2 * (x1_m - x)
    front = pullout_kn_m2 * (x - x0_m) + connection_kn_m
    hold = np.minimum(strength_kn_m, np.minimum(tail, front))
    return np.where((x > x0_m) & (x < x1_m), np.maximum(hold, 0.0), 0.0)


def crossing_hold(problem: Problem, nodes: Nodes, lines: Lines) -> np.ndarray:
    """Sum of T(x) over the layers each line crosses (kN/m), (lines,)."""
    total = np.zeros(lines.n)
    ya, yb = nodes.y_m[lines.a], nodes.y_m[lines.b]
    xa, xb = nodes.x_m[lines.a], nodes.x_m[lines.b]
    for lay in problem.layers:
        crosses = (ya - lay.level_m) * (yb - lay.level_m) < 0.0
        t = np.where(crosses, (lay.level_m - ya) / np.where(crosses, yb - ya, 1.0), 0.0)
        x = xa + t * (xb - xa)
        hold = layer_hold_kn_m(
            x, lay.x0_m, lay.x1_m, lay.strength_kn_m, lay.pullout_kn_m2, lay.connection_kn_m
        )
        total += np.where(crosses, hold, 0.0)
    return total


def extension_sign(lines: Lines) -> np.ndarray:
    """Factor turning a jump's x component into the stretch of a horizontal layer it cuts.

    The jump is v(left of a->b) - v(right of a->b). Going up (sin > 0) the left side is in
    front (smaller x), so the stretch is -jump_x; going down it is +jump_x.
    """
    return -np.sign(lines.sin)
