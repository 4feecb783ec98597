"""A cross-section of one screened segment drawn with characters.

The sketch is to scale (a terminal cell is about twice as tall as it is wide, so one row
stands for two columns' worth of metres). It shows the facing, the levelling pad, every
reinforcement layer to its length L, the line of maximum tension through the layers,
the ground behind (level or the backslope), the traffic and permanent surcharges,
and the embedment in front of the toe. Pure function of the inputs and the result:
no Textual, so it is tested on its own.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from rich.text import Text

from screening.engine.result import SegmentResult
from screening.model import Segment
from screening.model.units import Display

SI = Display("si")

CELL_ASPECT = 2.0
"""Height of a terminal cell over its width."""

STYLES = {
    "facing": "bold",
    "layer": "cyan",
    "tension": "magenta",
    "ground": "yellow",
    "pad": "bold",
    "load": "red",
    "label": "dim",
    "zone": "dim cyan",
}


@dataclass
class _Canvas:
    width: int
    height: int

    def __post_init__(self) -> None:
        self.chars = [[" "] * self.width for _ in range(self.height)]
        self.styles: list[list[str]] = [[""] * self.width for _ in range(self.height)]

    def put(self, col: int, row: int, char: str, style: str, *, over: bool = True) -> None:
        if (
            0 <= col < self.width
            and 0 <= row < self.height
            and (over or self.chars[row][col] == " ")
        ):
            self.chars[row][col] = char
            self.styles[row][col] = style

    def write(self, col: int, row: int, text: str, style: str) -> None:
        col = max(0, min(col, self.width - len(text)))
        for k, ch in enumerate(text):
            self.put(col + k, row, ch, style)

    def to_text(self) -> Text:
        out = Text()
        for r in range(self.height):
            for c in range(self.width):
                out.append(self.chars[r][c], self.styles[r][c] or None)
            if r < self.height - 1:
                out.append("\n")
        return out


def _tension_line(res: SegmentResult, kind: str) -> tuple[np.ndarray, np.ndarray]:
    """Depths (m, from the top of the reinforced zone) and distances La (m) of the line of
    maximum tension, from the engine's per-layer La with the toe (La = 0 at z = H) added."""
    h = res.design_height_m
    depth = [layer.depth_m for layer in res.layers]
    la = [layer.active_length_m for layer in res.layers]
    pairs = sorted(zip(depth, la, strict=True))
    depth = [p[0] for p in pairs] + [h]
    la = [p[1] for p in pairs] + [0.0]
    if len(pairs) >= 2 and kind == "extensible":  # a straight line: carry it to the top
        slope = (la[1] - la[0]) / max(depth[1] - depth[0], 1e-9)
        depth.insert(0, 0.0)
        la.insert(0, max(la[0] - slope * depth[1], 0.0))
    elif pairs:
        depth.insert(0, 0.0)
        la.insert(0, la[0])
    return np.asarray(depth), np.asarray(la)


def draw_section(
    segment: Segment, res: SegmentResult, width: int = 64, height: int = 18, display: Display = SI
) -> Text:
    """The segment's cross-section in ``width`` x ``height`` cells (face on the left),
    labelled in ``display``'s units."""
    h = max(res.design_height_m, 0.5)
    length = max(res.length_m, 0.5)
    d = res.embedment_m
    beta = math.radians(max(segment.backslope_deg, 0.0))
    toe = math.radians(max(segment.toe_slope_deg, 0.0))

    x_min = -max(1.6, 0.45 * length)
    x_max = 1.5 * length + 0.6
    rise = min(math.tan(beta) * x_max, 0.6 * h)
    y_min = -0.6
    y_max = h + rise
    top_rows = 3  # arrows and their label above the ground behind the wall
    body_rows = max(height - top_rows - 1, 4)
    s = max((x_max - x_min) / (width - 1), (y_max - y_min) / (body_rows * CELL_ASPECT))
    sx, sy = s, s * CELL_ASPECT
    x_min -= ((width - 1) * sx - (x_max - x_min)) / 2  # centre horizontally

    def col(x: float) -> int:
        return round((x - x_min) / sx)

    used_rows = round((y_max - y_min) / sy) + 2
    top_rows += max((height - top_rows - used_rows) // 2, 0)  # centre vertically

    def row(y: float) -> int:
        return top_rows + round((y_max - y) / sy)

    cv = _Canvas(width, height)
    face = col(0.0)

    # ground behind the wall (level, or the backslope rising from the top of the facing)
    # and in front of the toe (level, or falling away): a line drawn low, middle or high
    # in each cell, so a gentle slope reads as a slope rather than a staircase
    for c in range(width):
        x = (c - face) * sx
        y = h + min(math.tan(beta) * x, rise) if c >= face else d + math.tan(toe) * x
        exact = (y_max - y) / sy
        r = round(exact)
        frac = exact - r  # -0.5 (high in the cell) .. 0.5 (low)
        sloped = (c >= face and beta > 0) or (c < face and toe > 0)
        char = "━" if not sloped or abs(frac) < 1 / 6 else ("▁" if frac > 0 else "▔")
        cv.put(c, top_rows + r, char, STYLES["ground"])

    # reinforced zone: back boundary, pad, layers
    back = col(length)
    for r in range(row(h), row(0.0) + 1):
        cv.put(back, r, "┊", STYLES["zone"])
    for c in range(face, back + 1):
        cv.put(c, row(0.0) + 1, "▔", STYLES["pad"])
    for layer in res.layers:
        r = row(h - layer.depth_m)
        for c in range(face + 1, back + 1):
            cv.put(c, r, "─", STYLES["layer"])

    # line of maximum tension
    depth, la = _tension_line(res, segment.reinforcement.kind)
    if len(depth) >= 2:
        for r in range(row(h), row(0.0) + 1):
            z = h - (y_max - (r - top_rows) * sy)
            c = col(float(np.interp(z, depth, la)))
            if face < c < back:
                cv.put(c, r, "•", STYLES["tension"])

    # facing over the full design height
    for r in range(row(h), row(0.0) + 1):
        cv.put(face, r, "█", STYLES["facing"])

    # surcharges on top
    q_live, q_perm = res.traffic_kpa, segment.surcharge_kpa
    if q_live > 0 or q_perm > 0:
        words = []
        if q_live > 0:
            words.append(f"traffic {display.format(q_live, 'kPa', 0)}")
        if q_perm > 0:
            words.append(f"surcharge {display.format(q_perm, 'kPa', 0)}")
        start = face + max(1, round(0.3 / sx))
        for c in range(start, min(width, back + (back - face) // 3 + 1), 2):
            y_top = h + min(math.tan(beta) * (c - face) * sx, rise)
            cv.put(c, row(y_top) - 1, "↓", STYLES["load"])
        cv.write(start, 0, " + ".join(words), STYLES["load"])

    # dimensions
    f = display.format
    cv.write(back + 2, row(h * 0.5), f"L {f(res.length_m, 'm', 1)}", STYLES["label"])
    cv.write(back + 2, row(h * 0.5) + 1, f"L/Hd {res.length_m / h:.2f}", STYLES["label"])
    label_h = f"Hd {f(res.design_height_m, 'm', 1)}"
    cv.write(face - len(label_h) - 1, row(h * 0.6), label_h, STYLES["label"])
    label_d = f"d {f(d, 'm', 2)}"
    cv.write(face - len(label_d) - 1, row(d) - 1, label_d, STYLES["label"])
    cv.write(back + 2, row(0.0) + 1, "levelling pad", STYLES["label"])
    return cv.to_text()
