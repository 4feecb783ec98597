"""Figures of the report, drawn with matplotlib (Agg canvas, no pyplot, imported lazily).

- :func:`long_section_png`: one figure per wall along the chainage: exposed and design
  height with the verdict of each segment shaded behind, and below it the screened
  length L against the rule-of-thumb length.
- :func:`cross_section_png`: one segment across the wall: facing, levelling pad,
  reinforced zone with its layers, the line of maximum tension (the engine's La at each
  layer, and the method's line), ground in front at the embedment, the surcharge, the
  water table when it is near, and the critical slip circles when the screen has them.

Every figure returns PNG bytes; the report embeds them as base64.
"""

from __future__ import annotations

import io
import math
from collections.abc import Sequence

import numpy as np

from screening.engine.result import CorridorResult, cdr_text
from screening.model import Corridor, Segment
from screening.model.units import Display

VERDICT_COLOUR = {"clear": "#5b9e7a", "marginal": "#e0b04a", "refer": "#c4563f"}
"""Our own palette: sage, ochre, brick (readable in grey by the letters drawn too)."""
VERDICT_LETTER = {"clear": "C", "marginal": "M", "refer": "R"}
ZONE_COLOUR = "#e9e2d0"
LAYER_COLOUR = "#3b5b7a"
DPI = 110


def _figure(width_in: float, height_in: float, margins: dict[str, float], rows: int = 1, **kw):
    """A figure on its own Agg canvas (no pyplot state), with fixed margins: an automatic
    layout engine doubles the drawing time of every figure."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(width_in, height_in), dpi=DPI)
    FigureCanvasAgg(fig)
    axes = fig.subplots(rows, 1, **kw)
    fig.subplots_adjust(**margins)
    return fig, axes


def _png(fig) -> bytes:
    buf = io.BytesIO()
    fig.savefig(buf, format="png", dpi=DPI, pil_kwargs={"compress_level": 1})
    return buf.getvalue()


def walls(corridor: Corridor) -> dict[str, list[int]]:
    """Segment indices per wall, in file order, each wall sorted by chainage."""
    out: dict[str, list[int]] = {}
    for i, seg in enumerate(corridor.segments):
        out.setdefault(seg.wall, []).append(i)
    return {
        w: sorted(ix, key=lambda i: corridor.segments[i].chainage_start_m) for w, ix in out.items()
    }


def long_section_png(
    corridor: Corridor, result: CorridorResult, rows: Sequence[int], title: str, display: Display
) -> bytes:
    """Long section of the segments ``rows`` (one wall) along the chainage."""
    margins = {"left": 0.07, "right": 0.985, "top": 0.92, "bottom": 0.11, "hspace": 0.08}
    fig, (top, bottom) = _figure(10.0, 4.6, margins, rows=2, sharex=True, height_ratios=(3, 2))
    m = display.label("m")
    ch = lambda v: display.value(v, "m")  # noqa: E731 - a local unit helper
    tallest = 0.0
    for i in rows:
        seg = corridor.segments[i]
        c0, c1 = ch(seg.chainage_start_m), ch(seg.chainage_end_m)
        verdict = result.verdict[i]
        top.axvspan(c0, c1, color=VERDICT_COLOUR[verdict], alpha=0.25, lw=0)
        h = [ch(seg.height_start_m), ch(seg.height_end_m)]
        d = ch(float(result.embedment_m[i]))
        top.plot([c0, c1], h, color="#222222", lw=1.8)
        top.plot([c0, c1], [h[0] + d, h[1] + d], color="#222222", lw=1.0, ls="--")
        top.text(
            (c0 + c1) / 2, max(h) + d, VERDICT_LETTER[verdict], ha="center", va="bottom", fontsize=8
        )
        tallest = max(tallest, max(h) + d)
        length = ch(float(result.length_m[i]))
        rule = ch(float(result.rule_length_m[i]))
        bottom.plot([c0, c1], [length, length], color=LAYER_COLOUR, lw=2.0)
        bottom.plot([c0, c1], [rule, rule], color="#777777", lw=1.0, ls=":")
        bottom.axvline(c0, color="#bbbbbb", lw=0.5)
    top.set_ylim(0, tallest * 1.32 + 0.1)  # room for the legend
    top.set_ylabel(f"height ({m})")
    top.set_title(title, loc="left", fontsize=10)
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    handles = [
        Line2D([], [], color="#222222", lw=1.8, label="exposed height"),
        Line2D([], [], color="#222222", lw=1.0, ls="--", label="design height (with embedment)"),
        *(
            Patch(color=VERDICT_COLOUR[v], alpha=0.4, label=f"{v} ({VERDICT_LETTER[v]})")
            for v in VERDICT_COLOUR
        ),
    ]
    top.legend(handles=handles, fontsize=7, ncols=5, loc="upper left")
    bottom.set_ylabel(f"L ({m})")
    bottom.set_xlabel(f"chainage ({m})")
    ys = [max(line.get_ydata()) for line in bottom.get_lines() if len(line.get_ydata())]
    bottom.set_ylim(0, float(max(ys, default=1.0)) * 1.4 + 0.1)  # flat L lines stay off the frame
    bottom.legend(
        handles=[
            Line2D([], [], color=LAYER_COLOUR, lw=2.0, label="screened L"),
            Line2D([], [], color="#777777", ls=":", label="rule-of-thumb L"),
        ],
        fontsize=7,
        loc="lower left",
        ncols=2,
    )
    return _png(fig)


CIRCLE_KEYS = (("circle_x_m", "circle_y_m", "circle_r_m"), ("centre_x_m", "centre_y_m", "radius_m"))
"""Suffixes of the extras that give a critical circle: ``compound_circle_x_m`` …"""


def slip_circles(result: CorridorResult, i: int) -> list[tuple[str, float, float, float]]:
    """(name, centre x, centre y, radius) of each critical circle the screen reports.

    Reads extras named ``<name>_circle_x_m``, ``<name>_circle_y_m``, ``<name>_circle_r_m``
    (or ``…centre_x_m``/``centre_y_m``/``radius_m``); coordinates from the face (x, into
    the fill) and the base of the reinforced zone (y, up), as the slip search uses them.
    """
    out = []
    for key in result.extras:
        for kx, ky, kr in CIRCLE_KEYS:
            if not key.endswith(kx):
                continue
            prefix = key[: -len(kx)]
            try:
                x = float(np.asarray(result.extras[key])[i])
                y = float(np.asarray(result.extras[prefix + ky])[i])
                r = float(np.asarray(result.extras[prefix + kr])[i])
            except (KeyError, IndexError, TypeError, ValueError):
                continue
            if all(math.isfinite(v) for v in (x, y, r)) and r > 0:
                out.append((prefix.rstrip("_") or "critical", x, y, r))
    return out


BENCH_M = 1.2
"""Level bench in front of the face before a toe slope, as the slip search draws it."""


def _ground_m(
    x: np.ndarray, height_m: float, embedment_m: float, backslope: float, toe: float
) -> np.ndarray:
    """Ground level of the cross-section (tangents of the slopes given): in front, the
    embedment level, then after a bench a toe slope falling one design height; behind,
    the top of the wall and the backslope."""
    fall = np.clip((-x - BENCH_M) * toe, 0.0, height_m)
    return np.where(x < 0.0, embedment_m - fall, height_m + backslope * np.maximum(x, 0.0))


def max_tension_line(seg: Segment, height_m: float) -> tuple[list[float], list[float]]:
    """The method's line of maximum tension (x from the face, y from the base) [METHOD §5]:
    inextensible bilinear La = 0.3H above H/2 and 0.6(H - z) below; extensible Rankine
    plane through the toe at 45° + φ/2 from horizontal."""
    if seg.reinforcement.kind == "inextensible":
        return [0.0, 0.3 * height_m, 0.3 * height_m], [0.0, height_m / 2, height_m]
    run = height_m * math.tan(math.radians(45.0 - seg.fill.friction_deg / 2))
    return [0.0, run], [0.0, height_m]


def cross_section_png(
    corridor: Corridor, result: CorridorResult, i: int, display: Display
) -> bytes:
    """Cross-section of segment ``i`` at its tallest end."""
    seg = corridor.segments[i]
    s = lambda v: display.value(v, "m")  # noqa: E731
    unit = display.label("m")
    big_h = float(result.design_height_m[i])
    d = float(result.embedment_m[i])
    length = float(result.length_m[i])
    fig, ax = _figure(7.0, 4.4, {"left": 0.1, "right": 0.97, "top": 0.92, "bottom": 0.12})
    front = max(3.0, 0.6 * big_h)
    back = length + max(3.0, 0.8 * big_h)
    beta = math.tan(math.radians(seg.backslope_deg))
    toe = math.tan(math.radians(seg.toe_slope_deg))
    if toe > 0.0:
        front = max(front, BENCH_M + big_h / toe + 1.0)
    deep = -0.35 * big_h - (big_h if toe > 0.0 else 0.0)
    arcs = []
    for name, xc, yc, r in slip_circles(result, i):
        t = np.linspace(np.pi, 2 * np.pi, 361)  # the lower half: where a slip surface runs
        x, y = xc + r * np.cos(t), yc + r * np.sin(t)
        y = np.where(y <= _ground_m(x, big_h, d, beta, toe) + 1e-9, y, np.nan)
        if np.isfinite(y).any():
            arcs.append((name, x, y))
            front = max(front, -float(np.nanmin(np.where(np.isfinite(y), x, np.nan))) + 0.5)
            back = max(back, float(np.nanmax(np.where(np.isfinite(y), x, np.nan))) + 0.5)
            deep = min(deep, float(np.nanmin(y)) - 0.5)
    # soils: foundation (its top is the ground in front, the base behind), reinforced
    # zone, retained fill behind it and above it under a backslope
    xf = np.linspace(-front, 0.0, 80)
    ground_front = _ground_m(xf, big_h, d, beta, toe)
    xa = np.concatenate([xf, [0.0, back]])
    ax.fill_between(
        s(xa), s(deep), s(np.concatenate([ground_front, [0.0, 0.0]])), color="#d6d0c4", lw=0
    )
    xb = np.linspace(0.0, back, 40)
    ax.fill_between(
        s(xb), s(np.where(xb < length, big_h, 0.0)), s(big_h + beta * xb), color="#efece6", lw=0
    )
    ax.add_patch(_rect(0, 0, s(length), s(big_h), ZONE_COLOUR))
    ax.plot(s(xb), s(big_h + beta * xb), color="#555555", lw=1)
    ax.plot(s(xf), s(ground_front), color="#555555", lw=1)
    ax.plot([0, 0], [0, s(big_h)], color="#333333", lw=4, solid_capstyle="butt")  # facing
    ax.add_patch(_rect(s(-0.15), s(-0.15), s(0.45), s(0.15), "#999999"))  # levelling pad
    # layers and the line of maximum tension
    lay = result.layers
    mask = lay.mask[i]
    ys = big_h - lay.depth_m[i][mask]
    la = lay.active_length_m[i][mask]
    names = result.grade_names[i]
    grades = lay.grade_index[i][mask]
    for k, (y, g) in enumerate(zip(ys, grades, strict=True)):
        ax.plot([0, s(length)], [s(y), s(y)], color=LAYER_COLOUR, lw=1.3)
        if k == 0 or grades[k - 1] != g:  # name the grade where it starts (top down)
            label = names[g] if g >= 0 else "none strong enough"
            ax.text(s(length) + s(0.1), s(y), label, fontsize=6, va="center", color=LAYER_COLOUR)
    lx, ly = max_tension_line(seg, big_h)
    ax.plot(
        s(np.array(lx)),
        s(np.array(ly)),
        color="#8a3b2e",
        lw=1,
        ls="--",
        label="line of maximum tension",
    )
    ax.plot(s(la), s(ys), "o", ms=3, color="#8a3b2e", label="La at each layer (screen)")
    # loads and water
    q = seg.surcharge_kpa + float(result.traffic_kpa[i])
    if q > 0:
        for x in np.linspace(0.3, back - 0.3, 7):
            yt = big_h + beta * x
            ax.annotate(
                "",
                (s(x), s(yt)),
                (s(x), s(yt + 0.12 * big_h)),
                arrowprops={"arrowstyle": "->", "lw": 0.8},
            )
        text = f"q = {display.format(q, 'kPa')}"
        ax.text(
            s(back / 2), s(big_h + beta * back / 2 + 0.15 * big_h), text, ha="center", fontsize=7
        )
    if seg.foundation.water_depth_m < 0.35 * big_h:
        yw = -seg.foundation.water_depth_m
        ax.plot(
            [s(-front), s(back)],
            [s(yw), s(yw)],
            color="#2b6cb0",
            lw=1,
            ls="-.",
            label="water table",
        )
    for (name, xc, yc, r), colour in zip(
        slip_circles(result, i), ("#6b3fa0", "#2f7f6f", "#444444"), strict=False
    ):
        t = np.linspace(np.pi, 2 * np.pi, 361)  # the lower half: where a slip surface runs
        x, y = xc + r * np.cos(t), yc + r * np.sin(t)
        y = np.where(y <= _ground_m(x, big_h, d, beta, toe) + 1e-9, y, np.nan)
        ax.plot(s(x), s(y), lw=1.2, color=colour, label=f"critical {name} circle")
    ax.set_xlim(s(-front), s(back))
    ax.set_ylim(s(deep), s(big_h * 1.35 + beta * back * 0.5))
    ax.set_aspect("equal", adjustable="box")
    ax.set_xlabel(f"from the face ({unit})")
    ax.set_ylabel(f"above the base ({unit})")
    cdr = float(result.min_cdr[i])
    ax.set_title(
        f"{seg.id}: {result.verdict[i]}; H = {display.format(big_h, 'm')}, "
        f"L = {display.format(length, 'm')}, governing {result.governing[i]} (CDR {cdr_text(cdr)})",
        loc="left",
        fontsize=9,
    )
    ax.legend(fontsize=6, loc="upper left")  # the air in front of the wall is empty
    return _png(fig)


def _rect(x: float, y: float, w: float, h: float, colour: str):
    from matplotlib.patches import Rectangle

    return Rectangle((x, y), w, h, facecolor=colour, edgecolor="#888888", lw=0.6)
