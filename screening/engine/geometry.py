"""Design height, embedment, rule-of-thumb length and layer layout (METHOD section 1).

Embedment ratios k [from memory, AASHTO C11.10.2.2 / FHWA GEC 11 ch. 2]: 1/20 for level ground
in front of a wall, 1/10 in front of an abutment or on a 3H:1V toe slope, 1/7 on 2H:1V, 1/5 on
1.5H:1V. A toe slope between two of those takes the steeper row's ratio (conservative).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from screening.engine.arrays import SegmentArrays
from screening.engine.result import BoolArray, FloatArray, IntArray

ANGLE_3H1V_DEG = float(np.degrees(np.arctan(1 / 3)))
ANGLE_2H1V_DEG = float(np.degrees(np.arctan(1 / 2)))
ANGLE_15H1V_DEG = float(np.degrees(np.arctan(1 / 1.5)))
_ANGLE_TOL_DEG = 0.01
"""Slopes typed as 26.57 for 2H:1V still count as 2H:1V."""


def ceil_step(value_m: FloatArray, step_m: float) -> FloatArray:
    """Round up to the next multiple of ``step_m`` (a value already on the grid stays)."""
    return np.round(np.ceil(np.asarray(value_m) / step_m - 1e-9) * step_m, 10)


def floor_step(value_m: FloatArray, step_m: float) -> FloatArray:
    """Round down to a multiple of ``step_m`` (a value already on the grid stays)."""
    return np.round(np.floor(np.asarray(value_m) / step_m + 1e-9) * step_m, 10)


def embedment_ratio(toe_slope_deg: FloatArray, abutment: BoolArray) -> FloatArray:
    """k in d = k*H, from the toe slope and the structure (table in the module docstring)."""
    t = toe_slope_deg
    k = np.where(t <= _ANGLE_TOL_DEG, 1 / 20, 1 / 10)
    k = np.where(t > ANGLE_3H1V_DEG + _ANGLE_TOL_DEG, 1 / 7, k)
    k = np.where(t > ANGLE_2H1V_DEG + _ANGLE_TOL_DEG, 1 / 5, k)
    return np.where(abutment, np.maximum(k, 1 / 10), k)


def design_height(
    exposed_m: FloatArray, k: FloatArray, min_embedment_m: float
) -> tuple[FloatArray, FloatArray]:
    """(H, d) with H = exposed + d and d = max(min_embedment, k*H), solved exactly.

    d = k*H governs when k*He/(1-k) >= the minimum, giving H = He/(1-k); otherwise
    d = minimum and H = He + minimum.
    """
    proportional = exposed_m / (1.0 - k)
    d = np.where(k * proportional >= min_embedment_m, k * proportional, min_embedment_m)
    return exposed_m + d, d


def rule_length_ratio(backslope_deg: FloatArray, rules) -> FloatArray:
    """L/H by rule of thumb: 0.7, 0.8 from 3H:1V backslopes, 1.0 from 2H:1V (METHOD section 1)."""
    ratio = np.full(backslope_deg.shape, rules.rule_length_ratio)
    ratio = np.where(
        backslope_deg >= ANGLE_3H1V_DEG - _ANGLE_TOL_DEG,
        rules.rule_length_ratio_steep_backslope,
        ratio,
    )
    return np.where(
        backslope_deg >= ANGLE_2H1V_DEG - _ANGLE_TOL_DEG, rules.rule_length_ratio_2h1v, ratio
    )


@dataclass(frozen=True)
class Geometry:
    """Derived geometry of ``n`` segments; layer arrays are ``(n, m)``, top layer first."""

    design_height_m: FloatArray
    embedment_m: FloatArray
    embedment_ratio: FloatArray
    rule_length_m: FloatArray
    """max(ratio*H, minimum), rounded up to the length step."""
    max_length_m: FloatArray
    """Longest length screening tries: the longest step not beyond max_screen_length_ratio*H
    (or the rule length when that is longer)."""
    layer_count: IntArray
    layer_depth_m: FloatArray
    """Depth below the top of the reinforced zone; 0 on padding."""
    layer_mask: BoolArray


def layer_layout(
    height_m: FloatArray, spacing_m: FloatArray
) -> tuple[IntArray, FloatArray, BoolArray]:
    """Layers Sv/2 above the pad, then every Sv, none within Sv/2 of the top.

    Layer i counted from the bottom sits at depth z = H - Sv/2 - i*Sv, kept while z >= Sv/2,
    so the count is floor(H/Sv) (at least one). Returned top layer first.
    """
    count = np.maximum(np.floor(height_m / spacing_m + 1e-9), 1).astype(np.int64)
    m = int(count.max()) if count.size else 1
    j = np.arange(m)[None, :]
    top = height_m - spacing_m / 2 - (count - 1) * spacing_m
    depth = top[:, None] + j * spacing_m[:, None]
    mask = j < count[:, None]
    return count, np.where(mask, depth, 0.0), mask


def build_geometry(a: SegmentArrays) -> Geometry:
    rules = a.rules
    k = embedment_ratio(a.toe_slope_deg, a.abutment)
    h, d = design_height(a.exposed_height_m, k, rules.min_embedment_m)
    step = rules.length_step_m
    rule = ceil_step(
        np.maximum(rule_length_ratio(a.backslope_deg, rules) * h, rules.rule_length_min_m), step
    )
    longest = np.maximum(rule, floor_step(rules.max_screen_length_ratio * h, step))
    count, depth, mask = layer_layout(h, a.spacing_m)
    return Geometry(h, d, k, rule, longest, count, depth, mask)
