"""The mechanism check of one segment in the detail view: its factor and words, and its
mechanism drawn with braille dots to scale (an upper bound: unsafe side, always said)."""

from __future__ import annotations

import numpy as np
from rich.text import Text
from textual.widget import Widget

from screening.engine.mechanism.drawing import MechanismDrawing, drawing_for
from screening.engine.mechanism.flags import UPPER_BOUND_WORDS
from screening.tui.screens.mechanism_worker import automatic, store_for

BRAILLE_BASE = 0x2800
DOT = ((0x01, 0x08), (0x02, 0x10), (0x04, 0x20), (0x40, 0x80))
"""Braille dot bits by (row 0-3, column 0-1) within a cell."""
STYLES = (("mechanism", "bold red"), ("layer", "cyan"), ("zone", "dim"), ("ground", "yellow"))
"""Kinds of line, the first one present in a cell sets its colour."""
DRAWING_ROWS = 7
"""Rows of the drawing (the view is as tall as it needs, so the sketch above keeps room)."""


def braille(drawing: MechanismDrawing, width: int, height: int) -> Text:
    """The drawing in ``width`` x ``height`` cells, to scale (a braille dot is about square:
    2 dots across and 4 down a cell twice as tall as wide)."""
    x0, x1, y0, y1 = drawing.box
    px, py = 2 * width, 4 * height
    scale = min(px / max(x1 - x0, 1e-6), py / max(y1 - y0, 1e-6))
    dots = {kind: np.zeros((py, px), dtype=bool) for kind, _ in STYLES}

    def line(kind: str, ax: float, ay: float, bx: float, by: float) -> None:
        n = int(max(abs(bx - ax), abs(by - ay)) * scale * 2) + 2
        t = np.linspace(0.0, 1.0, n)
        c = np.round((ax + (bx - ax) * t - x0) * scale).astype(int)
        r = np.round((y1 - (ay + (by - ay) * t)) * scale).astype(int)
        ok = (c >= 0) & (c < px) & (r >= 0) & (r < py)
        dots[kind][r[ok], c[ok]] = True

    for a, b in zip(drawing.ground[:-1], drawing.ground[1:], strict=True):
        line("ground", *a, *b)
    for a, b in zip(drawing.zone[:-1], drawing.zone[1:], strict=True):
        line("zone", *a, *b)
    for seg in drawing.layers:
        line("layer", *seg)
    for ax, ay, bx, by, _ in drawing.lines:
        line("mechanism", ax, ay, bx, by)
    out = Text()
    for row in range(height):
        for col in range(width):
            code, style = 0, ""
            for kind, kind_style in STYLES:
                cell = dots[kind][4 * row : 4 * row + 4, 2 * col : 2 * col + 2]
                if cell.any():
                    style = style or kind_style
                    for (i, j), bit in np.ndenumerate(np.array(DOT)):
                        if cell[i, j]:
                            code |= int(bit)
            out.append(chr(BRAILLE_BASE + code) if code else " ", style=style)
        if row < height - 1:
            out.append("\n")
    return out


class MechanismView(Widget):
    """The mechanism check of the segment at ``row`` (or why there is none yet)."""

    DEFAULT_CSS = """
    MechanismView { height: auto; max-height: 16; border: round $panel-lighten-2; padding: 0 1; }
    """

    def __init__(self, session, row: int, **kwargs: object) -> None:
        super().__init__(**kwargs)
        self.session, self.row = session, row

    def show(self, row: int) -> None:
        self.row = row
        self.refresh()

    def _answer(self):
        s = self.session
        if s is None or s.result is None:
            return None
        return store_for(s).answer(s, self.row)

    def words(self) -> Text:
        """The heading and what the check says for this segment (or why it has nothing)."""
        s = self.session
        head = Text("Mechanism check", style="bold")
        head.append(
            f" — {UPPER_BOUND_WORDS}: the true factor may be lower; never the design number\n"
        )
        if s is None or s.result is None:
            head.append("waits for the screen", style="dim")
            return head
        store = store_for(s)
        answer = self._answer()
        if answer is None:
            if s.result.verdict[self.row] not in ("refer", "marginal"):
                head.append("runs on referred and marginal segments only", style="dim")
            elif store.running:
                head.append(f"running: {store.done}/{store.total} segments done", style="dim")
            elif not automatic():
                head.append("off here (WALLSCREEN_MECHANISM=off)", style="dim")
            else:
                head.append("not run yet: it runs after the next screen", style="dim")
            return head
        if not np.isfinite(answer.factor):
            head.append(answer.words, style="dim")
            return head
        mark = "flagged" if answer.flag else "no flag"
        head.append(
            f"F = {answer.factor:.3f}  target {answer.target:.3f}  {answer.nodes} nodes  {mark}\n",
            style="bold red" if answer.flag else "",
        )
        head.append(answer.words, style="dim")
        return head

    def render(self) -> Text:
        text = self.words()
        answer = self._answer()
        size = self.content_size
        if answer is None or not answer.lines or size.width < 20:
            return text
        body = text.split("\n")
        rows = DRAWING_ROWS
        s = self.session
        drawing = drawing_for(
            s.corridor.segments[self.row], s.result.segment(self.row), answer.lines
        )
        out = Text("\n").join(body[:2])
        out.append("\n")
        out.append_text(braille(drawing, size.width, rows))
        out.append("\n")
        out.append_text(Text("\n").join(body[2:]))
        return out
