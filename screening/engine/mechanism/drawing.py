"""The mechanism check's drawing as plain line segments, for the report and the interface.

Headless (no figure library): the section's ground line, the reinforced zone, its layers
and the mechanism's lines with their jumps, all in section coordinates (x from the face into
the fill, y up from the base of the reinforced zone, m), and the box worth showing. The
ground is drawn as the mechanism check models it (METHOD.md section 1): a 1.2 m bench and a
toe slope falling one design height in front, a backslope rising from the face.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

from screening.engine.mechanism.section import BENCH_M

Line = tuple[float, float, float, float]


@dataclass(frozen=True)
class MechanismDrawing:
    ground: tuple[tuple[float, float], ...]
    """Ground line from the left of the box to its right."""
    zone: tuple[tuple[float, float], ...]
    """Outline of the reinforced zone (closed)."""
    layers: tuple[Line, ...]
    lines: tuple[tuple[float, float, float, float, float], ...]
    """(x0, y0, x1, y1, jump): the mechanism, jump relative to the largest (0-1)."""
    box: tuple[float, float, float, float]
    """(x_min, x_max, y_min, y_max) worth showing."""


def mechanism_drawing(
    lines: Sequence[Sequence[float]],
    height_m: float,
    embedment_m: float,
    length_m: float,
    layer_levels_m: Sequence[float] = (),
    toe_slope_deg: float = 0.0,
    backslope_deg: float = 0.0,
) -> MechanismDrawing:
    """The drawing of one segment's mechanism (module docstring)."""
    h, d, big_l = float(height_m), float(embedment_m), float(length_m)
    segs = tuple(tuple(float(v) for v in ln[:5]) for ln in lines)
    xs = [0.0, big_l] + [v for s in segs for v in (s[0], s[2])]
    ys = [0.0, h] + [v for s in segs for v in (s[1], s[3])]
    pad = 0.15 * h
    x0, x1 = min(xs) - pad, max(xs) + pad
    y0, y1 = min(ys) - pad, max(ys) + pad
    tb = math.tan(math.radians(max(backslope_deg, 0.0)))
    ground: list[tuple[float, float]] = []
    if toe_slope_deg > 0.01:
        run = h / math.tan(math.radians(toe_slope_deg))
        foot = -(BENCH_M + run)
        ground += [(min(x0, foot), d - h), (foot, d - h), (-BENCH_M, d)]
    else:
        ground.append((min(x0, 0.0), d))
    ground += [(0.0, d), (0.0, h), (max(x1, big_l), h + max(x1, big_l) * tb)]
    y0 = min(y0, min(p[1] for p in ground))
    y1 = max(y1, h + max(x1, big_l) * tb)
    zone = ((0.0, 0.0), (big_l, 0.0), (big_l, h), (0.0, h), (0.0, 0.0))
    layers = tuple((0.0, float(y), big_l, float(y)) for y in layer_levels_m)
    return MechanismDrawing(tuple(ground), zone, layers, segs, (x0, x1, y0, y1))


def drawing_for(segment, result, lines: Sequence[Sequence[float]]) -> MechanismDrawing:
    """The drawing from a model ``Segment`` and its ``SegmentResult`` (layers, H, L)."""
    h = result.design_height_m
    return mechanism_drawing(
        lines,
        h,
        result.embedment_m,
        result.length_m,
        [h - layer.depth_m for layer in result.layers],
        segment.toe_slope_deg,
        segment.backslope_deg,
    )
