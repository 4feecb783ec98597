"""A small vector figure of a segment's mechanism (the mechanism check) for the HTML report.

Inline SVG, no figure library: the ground, the reinforced zone and its layers, and the
mechanism's lines drawn thicker where their jump is larger. The caption says what the
check is: an upper bound (unsafe side), a cross-check that never changes the verdict.
"""

from __future__ import annotations

from html import escape

from screening.engine.mechanism.drawing import MechanismDrawing, drawing_for
from screening.engine.mechanism.flags import UPPER_BOUND_WORDS
from screening.engine.result import CorridorResult
from screening.model import Corridor

WIDTH_PX = 520


def mechanism_svg(drawing: MechanismDrawing, title: str = "") -> str:
    """The drawing as an SVG element, to scale, WIDTH_PX wide."""
    x0, x1, y0, y1 = drawing.box
    scale = WIDTH_PX / max(x1 - x0, 1e-6)
    height = max(60, round((y1 - y0) * scale))

    def pt(x: float, y: float) -> str:
        return f"{(x - x0) * scale:.1f},{(y1 - y) * scale:.1f}"

    def poly(points, style: str) -> str:
        return f'<polyline points="{" ".join(pt(x, y) for x, y in points)}" {style}/>'

    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{WIDTH_PX}" height="{height}" '
        f'viewBox="0 0 {WIDTH_PX} {height}" role="img" aria-label="{escape(title)}">',
        poly(drawing.ground, 'fill="none" stroke="#6b5b2e" stroke-width="1.5"'),
        poly(drawing.zone, 'fill="#e8f0f8" stroke="#345" stroke-width="1"'),
    ]
    for ax, ay, bx, by in drawing.layers:
        parts.append(poly([(ax, ay), (bx, by)], 'stroke="#3a7ab8" stroke-width="0.8"'))
    for ax, ay, bx, by, jump in drawing.lines:
        width = 0.8 + 2.7 * max(0.0, min(jump, 1.0))
        parts.append(poly([(ax, ay), (bx, by)], f'stroke="#c0392b" stroke-width="{width:.2f}"'))
    parts.append("</svg>")
    return "".join(parts)


def mechanism_figure_html(corridor: Corridor, result: CorridorResult, i: int) -> str:
    """The figure and caption of segment ``i``; "" when the mechanism check has no
    mechanism for it (not run, or the screen carries none)."""
    seg = result.segment(i)
    lines = seg.extras.get("mechanism_lines")
    factor = seg.extras.get("mechanism_factor")
    if not lines or factor is None:
        return ""
    drawing = drawing_for(corridor.segments[i], seg, lines)
    title = f"mechanism of {seg.id}"
    caption = (
        f"{seg.id}: mechanism check (limit analysis, DLO), F = {factor:.3f}, an "
        f"{UPPER_BOUND_WORDS}; target {seg.extras.get('mechanism_target', float('nan')):.3f}. "
        f"{seg.extras.get('mechanism_words', '')}. Red: the mechanism's lines, thicker where "
        "they slip more. A cross-check, never the design number."
    )
    return f"<figure>{mechanism_svg(drawing, title)}<figcaption>{escape(caption)}</figcaption></figure>"
