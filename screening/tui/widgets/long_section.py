"""The long section of one wall (the cursor's): exposed heights along the chainage, each
column in its verdict.

Columns are bars of block characters (eight steps per row) scaled to the wall's tallest
point; under them a line of verdict marks (readable without colour) and a chainage axis
with a caret under the cursor's segment and the wall's name. Walls at the same chainage
(left and right sides) are never merged: each has its own section.
"""

from __future__ import annotations

import numpy as np
from rich.text import Text
from textual.widget import Widget

from screening.engine.result import CorridorResult
from screening.model import Corridor
from screening.model.units import Display
from screening.tui.cells import SI, VERDICT_MARK, VERDICT_STYLE

BLOCKS = " ▁▂▃▄▅▆▇█"
CURSOR_STYLE = "bold #e8e4dc"
"""The cursor's segment stands out in a light ink; its verdict stays in the marks below."""
RANK = {"clear": 0, "marginal": 1, "refer": 2}
NAMES = ("clear", "marginal", "refer")


GAP = 3
"""Columns left between stretches of the corridor with no wall (a long gap is not drawn to scale)."""


def column_chainages(start: np.ndarray, end: np.ndarray, width: int) -> tuple[np.ndarray, list]:
    """Chainage at the centre of each column (NaN in the gaps between walls) and
    ``(column, chainage)`` where each stretch of wall begins.

    Overlapping or touching segments form one stretch; stretches are drawn to one scale
    side by side with a gap of ``GAP`` columns, so a ramp far from the bridge approaches
    does not leave most of the strip empty.
    """
    order = np.argsort(start)
    blocks: list[list[float]] = []
    for a, b in zip(start[order], end[order], strict=True):
        if blocks and a <= blocks[-1][1] + 1e-9:
            blocks[-1][1] = max(blocks[-1][1], b)
        else:
            blocks.append([float(a), float(b)])
    usable = width - GAP * (len(blocks) - 1)
    if usable < 2 * len(blocks):  # too many stretches: one scale for the whole corridor
        blocks = [[float(start.min()), float(end.max())]]
        usable = width
    total = sum(b - a for a, b in blocks) or 1.0
    x = np.full(width, np.nan)
    starts = []
    col = 0
    for k, (a, b) in enumerate(blocks):
        n = max(int(round((b - a) / total * usable)), 1)
        if k == len(blocks) - 1:
            n = max(width - col, 1)
        n = min(n, width - col)
        x[col : col + n] = a + (np.arange(n) + 0.5) * (b - a) / n
        starts.append((col, a))
        col += n + GAP
        if col >= width:
            break
    return x, starts


def _append_runs(out: Text, chars: list[str], styles: list[str]) -> None:
    """Append ``chars`` with one span per run of equal styles (a span per cell made the
    strip the slowest thing on screen to draw after each edit)."""
    start = 0
    for c in range(1, len(chars) + 1):
        if c == len(chars) or styles[c] != styles[start]:
            out.append("".join(chars[start:c]), style=styles[start] or None)
            start = c


def section_text(
    corridor: Corridor,
    result: CorridorResult | None,
    cursor: int,
    width: int,
    height: int,
    stale: set[int] | frozenset[int] = frozenset(),
    display: Display = SI,
) -> Text:
    """The strip of the cursor's wall as text, ``width`` x ``height`` cells (>= 4 rows)."""
    if not corridor.segments or width < 10 or not 0 <= cursor < len(corridor.segments):
        return Text("")
    wall = corridor.segments[cursor].wall
    rows = [i for i, s in enumerate(corridor.segments) if s.wall == wall]
    segs = [corridor.segments[i] for i in rows]
    cursor = rows.index(cursor)
    if result is not None and len(result) == len(corridor.segments):
        verdicts = [result.verdict[i] for i in rows]
    else:
        verdicts = None
    stale = {k for k, i in enumerate(rows) if i in stale}
    bar_rows = max(height - 3, 1)
    start = np.array([s.chainage_start_m for s in segs])
    end = np.array([s.chainage_end_m for s in segs])
    h0 = np.array([s.height_start_m for s in segs])
    h1 = np.array([s.height_end_m for s in segs])
    x, starts = column_chainages(start, end, width)
    inside = (start[:, None] <= x[None, :]) & (x[None, :] <= end[:, None])
    # a segment narrower than a column still owns the column nearest its middle
    middle = (start + end) / 2
    gap = np.isnan(x)
    nearest = np.argmin(
        np.where(gap[None, :], np.inf, np.abs(x[None, :] - middle[:, None])), axis=1
    )
    inside[np.arange(len(segs)), nearest] = True
    t = np.clip((x[None, :] - start[:, None]) / np.maximum(end - start, 1e-9)[:, None], 0, 1)
    h = np.where(inside, h0[:, None] + t * (h1 - h0)[:, None], 0.0)
    col_h = h.max(axis=0)
    occupied = inside.any(axis=0)
    if verdicts is not None:
        rank = np.array([-1 if i in stale else RANK.get(v, 0) for i, v in enumerate(verdicts)])
        col_rank = np.where(inside, rank[:, None], -1).max(axis=0)
    else:
        col_rank = np.full(width, -1)
    top = max(float(col_h.max()), 1e-6)
    levels = np.rint(col_h / top * bar_rows * 8).astype(int)
    on_cursor = inside[cursor] if 0 <= cursor < len(segs) else np.zeros(width, bool)

    out = Text()
    column_style = [
        CURSOR_STYLE
        if on_cursor[c]
        else (VERDICT_STYLE[NAMES[col_rank[c]]] if col_rank[c] >= 0 else "dim")
        for c in range(width)
    ]
    for r in range(bar_rows):
        floor = (bar_rows - 1 - r) * 8
        fills = np.clip(levels - floor, 0, 8)
        _append_runs(out, [BLOCKS[int(f)] for f in fills], column_style)
        out.append("\n")
    marks, mark_styles = [], []
    for c in range(width):
        if not occupied[c]:
            marks.append(" ")
            mark_styles.append("")
        elif col_rank[c] >= 0:
            name = NAMES[col_rank[c]]
            marks.append(VERDICT_MARK[name])
            mark_styles.append(VERDICT_STYLE[name])
        else:
            marks.append("·")
            mark_styles.append("dim")
    _append_runs(out, marks, mark_styles)
    out.append("\n")
    caret = [" "] * width
    cols = np.flatnonzero(on_cursor)
    if cols.size:
        for c in cols:
            caret[c] = "▔"
        label = f" {segs[cursor].id} "
        at = int(min(max(cols[-1] + 1, 0), width - len(label)))
        if at <= cols[-1]:
            at = max(int(cols[0]) - len(label), 0)
        caret[at : at + len(label)] = list(label)
    out.append("".join(caret), style="bold")
    out.append("\n")
    axis = [" "] * width
    for c in np.flatnonzero(gap):
        axis[c] = "┆"
    m, u = display.value, display.label("m")
    for c, chainage in starts:
        label = f"{m(chainage, 'm'):.0f}"
        if all(ch == " " for ch in axis[c : c + len(label) + 1]) and c + len(label) <= width:
            axis[c : c + len(label)] = list(label)
    # the wall's tallest input, not the tallest drawn column (columns sample the profile
    # between segment ends, so a 7.0 m end drawn one column in read 6.9 m)
    peak = float(max(h0.max(), h1.max()))
    tail = f"{m(float(end.max()), 'm'):.0f} {u} · {wall} · max exposed {m(peak, 'm'):.1f} {u}"
    if len(tail) > width - 8:
        tail = f"{m(float(end.max()), 'm'):.0f} {u} · max {m(peak, 'm'):.1f} {u}"
    if all(ch == " " for ch in axis[width - len(tail) - 1 :]):
        axis[width - len(tail) :] = list(tail)
    out.append("".join(axis), style="dim")
    return out


class LongSection(Widget):
    """Heights and verdicts along the corridor, with the cursor's segment marked."""

    DEFAULT_CSS = "LongSection { height: 8; }"

    def __init__(self, **kwargs: object) -> None:
        super().__init__(**kwargs)
        self._corridor: Corridor | None = None
        self._result: CorridorResult | None = None
        self._cursor = 0
        self._stale: set[int] | frozenset[int] = frozenset()
        self._display = SI

    def show(
        self,
        corridor: Corridor,
        result: CorridorResult | None,
        cursor: int,
        stale: set[int] | frozenset[int] = frozenset(),
        display: Display = SI,
    ) -> None:
        self._corridor, self._result, self._cursor = corridor, result, cursor
        self._stale = frozenset(stale)
        self._display = display
        self.refresh()

    def render(self) -> Text:
        if self._corridor is None:
            return Text("")
        return section_text(
            self._corridor,
            self._result,
            self._cursor,
            self.content_size.width,
            self.content_size.height,
            self._stale,
            self._display,
        )
