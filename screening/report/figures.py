"""Figures of the report as inline SVG (no figure library; styles and shared symbols in
:mod:`screening.report.svg`, written once per page).

- :func:`long_section_svg`: one figure per wall along the chainage: exposed and design
  height with the verdict of each segment shaded behind (and its letter where there is
  room), and below it the screened length L against the rule-of-thumb length.
- :func:`cross_section_svg`: one segment across the wall: facing, levelling pad,
  reinforced zone with its layers, the line of maximum tension (the engine's La at each
  layer, and the method's line), ground in front at the embedment, the surcharge, the
  water table when it is near, and the critical slip circles when the screen has them.

Both are drawn to scale from the same geometry the screen used; a few kilobytes each.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from html import escape

import numpy as np

from screening.engine.result import CorridorResult, cdr_text
from screening.model import Corridor, Segment
from screening.model.units import Display
from screening.report.svg import VERDICT_COLOUR, Panel, svg
from screening.report.svg import num as _n

__all__ = ["VERDICT_COLOUR", "cross_section_svg", "long_section_svg", "slip_circles", "walls"]

VERDICT_LETTER = {"clear": "C", "marginal": "M", "refer": "R"}
LETTER_ROOM_PX = 9.0
"""A segment narrower than this on the long section gets its colour but no letter."""


def walls(corridor: Corridor) -> dict[str, list[int]]:
    """Segment indices per wall, in file order, each wall sorted by chainage."""
    out: dict[str, list[int]] = {}
    for i, seg in enumerate(corridor.segments):
        out.setdefault(seg.wall, []).append(i)
    return {
        w: sorted(ix, key=lambda i: corridor.segments[i].chainage_start_m) for w, ix in out.items()
    }


def long_section_svg(
    corridor: Corridor, result: CorridorResult, rows: Sequence[int], title: str, display: Display
) -> str:
    """Long section of the segments ``rows`` (one wall) along the chainage."""
    m = display.label("m")

    def ch(v: float) -> float:
        return display.value(float(v), "m")

    segs = [corridor.segments[i] for i in rows]
    c0s = [ch(s.chainage_start_m) for s in segs]
    c1s = [ch(s.chainage_end_m) for s in segs]
    d = [ch(result.embedment_m[i]) for i in rows]
    hs = [(ch(s.height_start_m), ch(s.height_end_m)) for s in segs]
    lengths = [ch(result.length_m[i]) for i in rows]
    rules = [ch(result.rule_length_m[i]) for i in rows]
    tallest = max((max(h) + e for h, e in zip(hs, d, strict=True)), default=1.0)
    x0, x1 = min(c0s, default=0.0), max(c1s, default=1.0)
    if x1 <= x0:
        x1 = x0 + 1.0
    top = Panel(60, 44, 925, 230, x0, x1, 0.0, tallest * 1.32 + 0.1)
    low = max(max(lengths, default=1.0), max(rules, default=1.0))
    bottom = Panel(60, 290, 925, 130, x0, x1, 0.0, low * 1.4 + 0.1)
    body = [f'<text x="60" y="18" class="title">{escape(title)}</text>']
    for k, i in enumerate(rows):
        verdict = result.verdict[i]
        left, right = top.x(c0s[k]), top.x(c1s[k])
        body.append(
            f'<rect class="v-{verdict}" x="{_n(left)}" y="{_n(top.top)}" '
            f'width="{_n(max(right - left, 0.3))}" height="{_n(top.height)}"/>'
        )
    body.append(top.axes(None, f"height ({m})"))
    body.append(top.path([[(c0s[k], hs[k][0]), (c1s[k], hs[k][1])] for k in range(len(rows))], "h"))
    body.append(
        top.path(
            [[(c0s[k], hs[k][0] + d[k]), (c1s[k], hs[k][1] + d[k])] for k in range(len(rows))],
            "hd",
        )
    )
    for k, i in enumerate(rows):
        if top.x(c1s[k]) - top.x(c0s[k]) >= LETTER_ROOM_PX:
            y = max(hs[k]) + d[k]
            mid = (c0s[k] + c1s[k]) / 2
            body.append(
                f'<text x="{_n(top.x(mid))}" y="{_n(top.y(y) - 3)}" class="small" '
                f'text-anchor="middle">{VERDICT_LETTER[result.verdict[i]]}</text>'
            )
    body.append(_legend_long(top))
    body.append(bottom.axes(f"chainage ({m})", f"L ({m})", grid_x=c0s))
    body.append(
        bottom.path([[(c0s[k], lengths[k]), (c1s[k], lengths[k])] for k in range(len(rows))], "len")
    )
    body.append(
        bottom.path([[(c0s[k], rules[k]), (c1s[k], rules[k])] for k in range(len(rows))], "rule")
    )
    lx, ly = bottom.left + 8, bottom.top + bottom.height - 10
    body.append(
        f'<path class="len" d="M{_n(lx)},{_n(ly)}h22"/><text x="{_n(lx + 28)}" y="{_n(ly + 3)}" '
        f'class="small">screened L</text><path class="rule" d="M{_n(lx + 110)},{_n(ly)}h22"/>'
        f'<text x="{_n(lx + 138)}" y="{_n(ly + 3)}" class="small">rule-of-thumb L</text>'
    )
    return svg(1000, 460, f"long section of {title}", body)


def _legend_long(panel: Panel) -> str:
    x, y = panel.left + 8, panel.top + 12
    out = [
        f'<path class="h" d="M{_n(x)},{_n(y)}h22"/><text x="{_n(x + 28)}" y="{_n(y + 3)}" '
        'class="small">exposed height</text>',
        f'<path class="hd" d="M{_n(x + 120)},{_n(y)}h22"/><text x="{_n(x + 148)}" '
        f'y="{_n(y + 3)}" class="small">design height (with embedment)</text>',
    ]
    for k, v in enumerate(VERDICT_COLOUR):
        px = x + 330 + 110 * k
        out.append(
            f'<rect class="v-{v}" x="{_n(px)}" y="{_n(y - 5)}" width="18" height="10"/>'
            f'<text x="{_n(px + 24)}" y="{_n(y + 3)}" class="small">{v} ({VERDICT_LETTER[v]})</text>'
        )
    return "".join(out)


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


CIRCLE_CLASSES = ("c0", "c1", "c2")
XS_WIDTH, XS_HEIGHT = 640, 400
"""Largest size of a cross-section in pixels (a flat drawing is made less tall)."""


def slip_ends(result: CorridorResult, i: int, name: str) -> tuple[float, float] | None:
    """x of the exit and the entry of circle ``name`` (``<name>_circle_exit_x_m``, ...), or
    None when the screen does not give them."""
    try:
        xe = float(np.asarray(result.extras[f"{name}_circle_exit_x_m"])[i])
        xn = float(np.asarray(result.extras[f"{name}_circle_entry_x_m"])[i])
    except (KeyError, IndexError, TypeError, ValueError):
        return None
    return (xe, xn) if math.isfinite(xe) and math.isfinite(xn) and xn > xe else None


def _circle_runs(xc, yc, r, big_h, d, beta, toe, ends=None) -> list[list[tuple[float, float]]]:
    """The slip surface of a circle as runs of points: the arc from its exit to its entry
    when ``ends`` gives them (the circle beyond them is not part of the mechanism), else the
    lower half where it lies below the ground."""
    if ends is not None:
        # both ends lie on the circle's lower half (the search keeps the centre above them)
        te, tn = (math.pi + math.acos(max(-1.0, min(1.0, -(x - xc) / r))) for x in ends)
        if te < tn:
            t = np.linspace(te, tn, 121)
            xs, ys = (xc + r * np.cos(t)).tolist(), (yc + r * np.sin(t)).tolist()
            return [list(zip(xs, ys, strict=True))]
    t = np.linspace(np.pi, 2 * np.pi, 121)
    x, y = xc + r * np.cos(t), yc + r * np.sin(t)
    below = y <= _ground_m(x, big_h, d, beta, toe) + 1e-9
    runs, run = [], []
    for xi, yi, ok in zip(x.tolist(), y.tolist(), below.tolist(), strict=True):
        if ok:
            run.append((xi, yi))
        elif run:
            runs.append(run)
            run = []
    if run:
        runs.append(run)
    return runs


def cross_section_svg(corridor: Corridor, result: CorridorResult, i: int, display: Display) -> str:
    """Cross-section of segment ``i`` at its tallest end, to scale."""
    seg = corridor.segments[i]
    unit = display.label("m")
    big_h = float(result.design_height_m[i])
    d = float(result.embedment_m[i])
    length = float(result.length_m[i])
    front = max(3.0, 0.6 * big_h)
    back = length + max(3.0, 0.8 * big_h)
    beta = math.tan(math.radians(seg.backslope_deg))
    toe = math.tan(math.radians(seg.toe_slope_deg))
    if toe > 0.0:
        front = max(front, BENCH_M + big_h / toe + 1.0)
    deep = -0.35 * big_h - (big_h if toe > 0.0 else 0.0)
    arcs = []
    for name, xc, yc, r in slip_circles(result, i):
        runs = _circle_runs(xc, yc, r, big_h, d, beta, toe, slip_ends(result, i, name))
        if runs:
            arcs.append((name, runs, r))
            xs = [p[0] for run in runs for p in run]
            front = max(front, -min(xs) + 0.5)
            back = max(back, max(xs) + 0.5)
            deep = min(deep, min(p[1] for run in runs for p in run) - 0.5)
    top_y = big_h * 1.35 + beta * back * 0.5
    # to scale: the box shrinks to the drawing's proportions inside the figure
    room_w, room_h = XS_WIDTH - 70, XS_HEIGHT - 80
    scale = min(room_w / (front + back), room_h / (top_y - deep))
    w, h = (front + back) * scale, (top_y - deep) * scale
    v = lambda x: display.value(x, "m")  # noqa: E731 - a local unit helper
    p = Panel(60 + (room_w - w) / 2, 34, w, h, v(-front), v(back), v(deep), v(top_y))

    def pts(xs, ys) -> list[tuple[float, float]]:
        return [(v(a), v(b)) for a, b in zip(xs, ys, strict=True)]

    # ground in front: level at the embedment, a bench, then the toe slope (exact corners)
    corners = [-front, 0.0, -BENCH_M]
    if toe > 0.0:
        corners.append(-BENCH_M - big_h / toe)
    xf = np.array(sorted(c for c in set(corners) if -front <= c <= 0.0))
    gf = _ground_m(np.minimum(xf, -1e-12), big_h, d, beta, toe)  # at the face: still in front
    crest = big_h + beta * back
    body = [
        p.polygon(pts([*xf, 0.0, back, back, -front], [*gf, 0.0, 0.0, deep, deep]), "fnd"),
        p.polygon(pts([0.0, back, back, length, length], [big_h, crest, 0, 0, big_h]), "ret"),
        p.polygon(pts([0, length, length, 0], [0, 0, big_h, big_h]), "zone"),
        p.path([pts([0.0, back], [big_h, crest]), pts(xf, gf)], "gl"),
        p.polygon(pts([-0.15, 0.3, 0.3, -0.15], [-0.15, -0.15, 0.0, 0.0]), "pad"),
        p.path([pts([0, 0], [0, big_h])], "face"),
    ]
    lay = result.layers
    mask = lay.mask[i]
    ys = (big_h - lay.depth_m[i][mask]).tolist()
    la = lay.active_length_m[i][mask].tolist()
    names = result.grade_names[i]
    grades = lay.grade_index[i][mask].tolist()
    body.append(p.path([pts([0.0, length], [y, y]) for y in ys], "lay"))
    for k, (y, g) in enumerate(zip(ys, grades, strict=True)):
        if k == 0 or grades[k - 1] != g:  # name the grade where it starts (top down)
            label = names[g] if g >= 0 else "none strong enough"
            body.append(p.text(v(length + 0.1), v(y), label, "gr"))
    lx, ly = max_tension_line(seg, big_h)
    body.append(p.path([pts(lx, ly)], "mt"))
    body.append(
        '<path class="la" d="'
        + "".join(f"M{p.pt(v(a), v(b))}h0" for a, b in zip(la, ys, strict=True))
        + '"/>'
    )
    q = seg.surcharge_kpa + float(result.traffic_kpa[i])
    if q > 0:
        arrows = []
        for x in np.linspace(0.3, back - 0.3, 7).tolist():
            yt = big_h + beta * x
            arrows.append(f"M{p.pt(v(x), v(yt + 0.12 * big_h))}L{p.pt(v(x), v(yt))}")
        body.append(f'<path class="q" d="{"".join(arrows)}"/>')
        mid = back / 2
        words = f"q = {display.format(q, 'kPa')}"
        body.append(p.text(v(mid), v(big_h + beta * mid + 0.15 * big_h), words, "small", "middle"))
    legend = []
    if seg.foundation.water_depth_m < 0.35 * big_h:
        yw = -seg.foundation.water_depth_m
        body.append(p.path([pts([-front, back], [yw, yw])], "wt"))
        legend.append(("wt", "water table"))
    px_per_unit = p.width / (p.x1 - p.x0)  # the same on both axes: drawn to scale
    for (name, runs, r), cls in zip(arcs, CIRCLE_CLASSES, strict=False):
        radius = _n(v(r) * px_per_unit)
        # each run is one arc of the circle's lower half, left to right (sweep 0 on screen)
        d = "".join(
            f"M{p.pt(v(run[0][0]), v(run[0][1]))}A{radius},{radius} 0 0 0 "
            f"{p.pt(v(run[-1][0]), v(run[-1][1]))}"
            for run in runs
            if len(run) >= 2
        )
        body.append(f'<path class="{cls}" d="{d}"/>')
        legend.append((cls, f"critical {name} circle"))
    body.append(p.axes(f"from the face ({unit})", f"above the base ({unit})"))
    cdr = float(result.min_cdr[i])
    governing = result.governing[i]
    if result.verdict[i] == "refer" and governing not in result.checks:
        why = f"outside screening: {governing}"  # a scope rule has no CDR to show
    else:
        why = f"governing {governing} (CDR {cdr_text(cdr)})"
    title = (
        f"{seg.id}: {result.verdict[i]}; H = {display.format(big_h, 'm')}, "
        f"L = {display.format(length, 'm')}, {why}"
    )
    body.append(f'<text x="60" y="20" class="title">{escape(title)}</text>')
    # legend in the air in front of the wall: the shared entries, then this figure's own
    gx, gy = p.left + 6, p.top + 4
    body.append(f'<use href="#fig-xs-legend" x="{_n(gx)}" y="{_n(gy)}"/>')
    for k, (cls, words) in enumerate(legend):
        y = gy + 38 + 15 * k
        body.append(
            f'<path class="{cls}" d="M{_n(gx + 2)},{_n(y)}h22"/>'
            f'<text x="{_n(gx + 30)}" y="{_n(y + 3)}" class="small">{escape(words)}</text>'
        )
    height = round(p.top + p.height + 46)  # the drawing's own proportions, no empty band
    return svg(XS_WIDTH, height, f"cross-section of {seg.id}", body)
