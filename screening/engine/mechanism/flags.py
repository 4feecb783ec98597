"""When the mechanism check flags a segment, and the words that say why (METHOD.md, 6).

The factor is an upper bound (unsafe side), never the design number: the check only adds a
flag and words to a segment, and never changes its verdict.

A segment is flagged when
- its mechanism factor F is below ``target x (1 + DISCRETISATION_ALLOWANCE)``: the grid's
  bias lies on the unsafe side, so an F within the allowance above the target does not show
  that the target is reached (and an F below the target fails even as an upper bound); or
- F is below ``CIRCLE_RATIO`` x the slip circles' factor: as an upper bound the true
  factor is lower still, so the circles missed a weaker mechanism. Only this direction is
  flagged: F above the circles' factor is what an upper bound with a coarse grid gives, and
  the circles, being lower, are then the number that governs.
"""

from __future__ import annotations

import math

import numpy as np

DISCRETISATION_ALLOWANCE = 0.05
"""Measured bias of F at the working grid (NODES in check.py) on walls: +2 to +4 % against
a grid of ~700 nodes on the demo's walls (bench_mechanism.py item 5), and more against the
converged value; 5 % covers the measured part [measured, METHOD.md section 6]."""
CIRCLE_RATIO = 0.95
"""F below this times the circles' F is flagged: Bishop's simplified method lies within a
few per cent of rigorous limit-equilibrium solutions on circles [mem, Duncan & Wright,
Soil Strength and Slope Stability, ch. 6] and the slip search within 1 % of a brute-force
search (bench_compound.py), so a gap over 5 % is a mechanism the circles do not find."""
UPPER_BOUND_WORDS = "upper bound (unsafe side)"


def _cut(value: float) -> str:
    """Three decimals, cut (never rounded up), so a factor under its target never reads as it."""
    return f"{math.floor(value * 1000 + 1e-9) / 1000:.3f}"


def mechanism_flag(factor: float, target: float, circles: float) -> tuple[bool, str]:
    """(flag, words) for one segment (module docstring); circles NaN when not known."""
    ub = UPPER_BOUND_WORDS
    has_circles = math.isfinite(circles) and circles > 0
    against = (
        f"; slip circles F = {circles:.3f} (mechanism {100 * (factor / circles - 1):+.0f} %)"
        if has_circles
        else ""
    )
    head = f"mechanism check F = {_cut(factor)}, {ub}, target {target:.3f}{against}"
    reasons = []
    if factor < target:
        reasons.append("below the target even as an upper bound: the true factor is lower")
    elif factor < target * (1.0 + DISCRETISATION_ALLOWANCE):
        reasons.append(
            f"within the grid's {100 * DISCRETISATION_ALLOWANCE:.0f} % allowance above the "
            "target: it does not show that the target is reached"
        )
    if has_circles and factor < CIRCLE_RATIO * circles:
        reasons.append(
            f"more than {100 * (1 - CIRCLE_RATIO):.0f} % below the slip circles: a weaker "
            "mechanism than any circle"
        )
    if not reasons:
        return False, f"{head}: no flag (a cross-check, never the design number)"
    return True, f"{head}: " + "; ".join(reasons) + " (a cross-check: full design decides)"


def mechanism_where(
    x0: np.ndarray,
    y0: np.ndarray,
    x1: np.ndarray,
    y1: np.ndarray,
    jump: np.ndarray,
    length_m: float,
    layer_levels_m: np.ndarray,
) -> str:
    """Where the mechanism runs, in the words of a section drawing: how far in front of the
    face and behind the reinforced zone it reaches, how deep below the base, and how many
    layers its lines cut inside the reinforced zone."""
    moving = jump > 0.02
    if not moving.any():
        return "no mechanism forms"
    xs = np.concatenate([x0[moving], x1[moving]])
    ys = np.concatenate([y0[moving], y1[moving]])
    front, back, deep = -float(xs.min()), float(xs.max()) - length_m, -float(ys.min())
    parts = [
        f"{front:.1f} m in front of the face" if front > 0.05 else "from the face",
        f"{back:.1f} m behind the reinforced zone" if back > 0.05 else "within the reinforced zone",
        f"{deep:.1f} m below the base" if deep > 0.05 else "above the base",
    ]
    cut = 0
    for lev in np.asarray(layer_levels_m, dtype=np.float64).tolist():
        crosses = (y0[moving] - lev) * (y1[moving] - lev) < 0
        t = np.where(crosses, (lev - y0[moving]) / np.where(crosses, y1[moving] - y0[moving], 1), 0)
        x = x0[moving] + t * (x1[moving] - x0[moving])
        cut += int(np.any(crosses & (x > 0) & (x < length_m)))
    layers = f"cuts {cut} of {len(layer_levels_m)} layers" if len(layer_levels_m) else "no layers"
    return "mechanism reaches " + ", ".join(parts) + f"; {layers}"
