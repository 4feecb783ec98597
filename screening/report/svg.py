"""Small pieces of inline SVG for the report's figures: a panel with data coordinates,
axes with round ticks, compact numbers, and the styles and shared symbols every figure
uses (written once per page, in :data:`FIGURE_CSS` and :func:`shared_defs`).

No figure library: a figure is text, drawn in milliseconds and a few kilobytes, and stays
sharp at any zoom. Elements carry classes, not styles, so nothing is repeated per figure.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass
from html import escape

VERDICT_COLOUR = {"clear": "#5b9e7a", "marginal": "#e0b04a", "refer": "#c4563f"}
"""Our own palette: sage, ochre, brick (readable in grey by the letters drawn too)."""

FIGURE_CSS = """
svg.fig { display: block; max-width: 100%; height: auto; border: 1px solid #ddd; background: #fff; font: 11px system-ui, sans-serif; }
.fig text { fill: #222; } .fig .small { font-size: 9px; } .fig .title { font-size: 12px; }
.fig .frame { fill: none; stroke: #444; stroke-width: 0.8; } .fig .tick { stroke: #444; stroke-width: 0.8; }
.fig .grid { stroke: #bbb; stroke-width: 0.5; }
.fig .v-clear { fill: #5b9e7a; fill-opacity: 0.25; } .fig .v-marginal { fill: #e0b04a; fill-opacity: 0.25; }
.fig .v-refer { fill: #c4563f; fill-opacity: 0.25; }
.fig .h { fill: none; stroke: #222; stroke-width: 1.8; } .fig .hd { fill: none; stroke: #222; stroke-width: 1; stroke-dasharray: 5 3; }
.fig .len { fill: none; stroke: #3b5b7a; stroke-width: 2; } .fig .rule { fill: none; stroke: #777; stroke-width: 1; stroke-dasharray: 1.5 2; }
.fig .fnd { fill: #d6d0c4; } .fig .ret { fill: #efece6; } .fig .zone { fill: #e9e2d0; stroke: #888; stroke-width: 0.6; }
.fig .gl { fill: none; stroke: #555; stroke-width: 1; } .fig .face { stroke: #333; stroke-width: 4; } .fig .pad { fill: #999; stroke: #888; stroke-width: 0.6; }
.fig .lay { fill: none; stroke: #3b5b7a; stroke-width: 1.3; } .fig .gr { fill: #3b5b7a; font-size: 8px; }
.fig .mt { fill: none; stroke: #8a3b2e; stroke-width: 1; stroke-dasharray: 4 2; }
.fig .la { fill: none; stroke: #8a3b2e; stroke-width: 5; stroke-linecap: round; }
.fig .q { stroke: #222; stroke-width: 0.8; marker-end: url(#fig-arrow); }
.fig .wt { fill: none; stroke: #2b6cb0; stroke-width: 1; stroke-dasharray: 6 2 1 2; }
.fig .c0 { fill: none; stroke: #6b3fa0; stroke-width: 1.2; } .fig .c1 { fill: none; stroke: #2f7f6f; stroke-width: 1.2; }
.fig .c2 { fill: none; stroke: #444; stroke-width: 1.2; }
"""
"""Styles of every figure, in the page's one stylesheet."""


def shared_defs() -> str:
    """Symbols the figures share, once per page: the surcharge arrow head and the legend
    entries of every cross-section."""
    return (
        '<svg width="0" height="0" style="position:absolute" aria-hidden="true"><defs>'
        '<marker id="fig-arrow" viewBox="0 0 6 6" refX="5" refY="3" markerWidth="6" '
        'markerHeight="6" orient="auto"><path d="M0,0L6,3L0,6z" fill="#222"/></marker>'
        '<symbol id="fig-xs-legend" width="190" height="30">'
        '<path class="mt" d="M2,8h22"/><text x="30" y="11" class="small">line of maximum '
        'tension</text><path class="la" d="M13,23h0"/><text x="30" y="26" class="small">'
        "La at each layer (screen)</text></symbol></defs></svg>"
    )


def num(v: float) -> str:
    """A coordinate in pixels, to a tenth ("12.5", "-3", "0")."""
    text = f"{v:.1f}"
    if text.endswith(".0"):
        text = text[:-2]
    return "0" if text == "-0" else text


def nice_ticks(lo: float, hi: float, most: int = 7) -> list[float]:
    """Round tick values (steps of 1, 2 or 5 times a power of ten) within [lo, hi]."""
    span = hi - lo
    if not math.isfinite(span) or span <= 0:
        return [lo]
    raw = span / max(most - 1, 1)
    power = 10.0 ** math.floor(math.log10(raw))
    step = next(m * power for m in (1, 2, 5, 10) if m * power >= raw)
    first = math.ceil(lo / step - 1e-9)
    return [k * step for k in range(first, int(math.floor(hi / step + 1e-9)) + 1)]


def tick_text(v: float) -> str:
    text = f"{v:.6g}"
    return "0" if text in ("-0", "0") else text


@dataclass(frozen=True)
class Panel:
    """A plotting box in pixels (left, top, width, height) showing data x0..x1, y0..y1."""

    left: float
    top: float
    width: float
    height: float
    x0: float
    x1: float
    y0: float
    y1: float

    def x(self, v: float) -> float:
        return self.left + (v - self.x0) / (self.x1 - self.x0) * self.width

    def y(self, v: float) -> float:
        return self.top + (self.y1 - v) / (self.y1 - self.y0) * self.height

    def pt(self, x: float, y: float) -> str:
        return f"{num(self.x(x))},{num(self.y(y))}"

    def path(self, runs: Iterable[Sequence[tuple[float, float]]], cls: str) -> str:
        """One path of several polylines (each run of at least two points)."""
        d = "".join("M" + "L".join(self.pt(x, y) for x, y in run) for run in runs if len(run) >= 2)
        return f'<path class="{cls}" d="{d}"/>' if d else ""

    def polygon(self, points: Sequence[tuple[float, float]], cls: str) -> str:
        return f'<polygon class="{cls}" points="{" ".join(self.pt(x, y) for x, y in points)}"/>'

    def text(self, x: float, y: float, words: str, cls: str = "", anchor: str = "start") -> str:
        c = f' class="{cls}"' if cls else ""
        a = f' text-anchor="{anchor}"' if anchor != "start" else ""
        return f'<text x="{num(self.x(x))}" y="{num(self.y(y))}"{c}{a}>{escape(words)}</text>'

    def axes(self, xlabel: str | None, ylabel: str, *, grid_x: Sequence[float] = ()) -> str:
        """Frame, ticks with their values, axis labels."""
        out = [
            f'<rect class="frame" x="{num(self.left)}" y="{num(self.top)}" '
            f'width="{num(self.width)}" height="{num(self.height)}"/>'
        ]
        bottom = self.top + self.height
        ticks = []
        for v in nice_ticks(self.y0, self.y1, 5):
            py = num(self.y(v))
            ticks.append(f"M{num(self.left - 4)},{py}h4")
            out.append(
                f'<text x="{num(self.left - 6)}" y="{py}" dy="3.5" class="small" '
                f'text-anchor="end">{tick_text(v)}</text>'
            )
        for v in nice_ticks(self.x0, self.x1, 8):
            px = num(self.x(v))
            ticks.append(f"M{px},{num(bottom)}v4")
            if xlabel is not None:
                out.append(
                    f'<text x="{px}" y="{num(bottom + 14)}" class="small" '
                    f'text-anchor="middle">{tick_text(v)}</text>'
                )
        out.append(f'<path class="tick" d="{"".join(ticks)}"/>')
        if grid_x:
            d = "".join(f"M{num(self.x(v))},{num(self.top)}V{num(bottom)}" for v in grid_x)
            out.insert(0, f'<path class="grid" d="{d}"/>')
        if xlabel is not None:
            out.append(
                f'<text x="{num(self.left + self.width / 2)}" y="{num(bottom + 28)}" '
                f'text-anchor="middle">{escape(xlabel)}</text>'
            )
        cy = num(self.top + self.height / 2)
        out.append(
            f'<text transform="translate({num(self.left - 36)},{cy}) rotate(-90)" '
            f'text-anchor="middle">{escape(ylabel)}</text>'
        )
        return "".join(out)


def svg(width: int, height: int, label: str, body: Iterable[str]) -> str:
    """An inline SVG element of the report (class ``fig``: styles from FIGURE_CSS)."""
    return (
        f'<svg class="fig" viewBox="0 0 {width} {height}" width="{width}" height="{height}" '
        f'role="img" aria-label="{escape(label)}">' + "".join(body) + "</svg>"
    )
