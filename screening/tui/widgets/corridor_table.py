"""The corridor table: one row per segment, inputs on the left, the screen on the right."""

from __future__ import annotations

from collections.abc import Iterable
from functools import partial

from rich.text import Text
from textual.binding import Binding
from textual.coordinate import Coordinate
from textual.widgets import DataTable

from screening.tui.cells import COLUMNS, row_cells
from screening.tui.session import Session

MARK_STYLE = "reverse"
BATCH = 100
"""Rows redrawn per event-loop turn in a gradual update (about 50 ms)."""


class CorridorTable(DataTable):
    """Segments in corridor order; the row index is the segment's index."""

    BINDINGS = [Binding("enter", "select_cursor", "Detail", tooltip="Open the segment's detail")]

    def __init__(self, **kwargs: object) -> None:
        super().__init__(cursor_type="row", zebra_stripes=True, **kwargs)
        self.marked: set[int] = set()
        self._generation = 0
        self.updating = False
        """A gradual redraw of every row is under way."""

    def on_mount(self) -> None:
        for key, heading, width in COLUMNS:
            self.add_column(heading, key=key, width=width)

    def _update_dimensions(self, new_rows: Iterable[object]) -> None:
        """Every column has a fixed width and every row one line, so there is nothing to
        measure: skip DataTable's pass over every cell of the new rows (about 0.4 ms a
        row, two seconds that froze the interface after loading 5,000 segments).
        Overrides a private method of Textual 8's DataTable (pinned <9 in pyproject)."""
        super()._update_dimensions(())

    def _cells(self, session: Session, i: int) -> list[Text]:
        cells = row_cells(
            session.corridor.segments[i],
            session.result,
            i,
            session.pending(i),
            session.provisional(i),
            session.display,
        )
        if i in self.marked:
            cells[0] = Text(cells[0].plain, style=f"bold {MARK_STYLE}")
        return cells

    def load(self, session: Session, cursor: int = 0) -> None:
        """Rebuild every row (after segments were added, removed or reordered)."""
        self._generation += 1  # any gradual update of the old rows stops
        self.updating = False
        self.clear(columns=False)
        n = len(session.corridor.segments)
        for i in range(n):
            self.add_row(*self._cells(session, i), key=str(i))
        if n:
            self.move_cursor(row=max(0, min(cursor, n - 1)), animate=False)

    def update_rows(self, rows: Iterable[int], session: Session) -> None:
        """Redraw ``rows`` in place (after an edit or a finished screen)."""
        for i in rows:
            for c, cell in enumerate(self._cells(session, i)):
                self.update_cell_at(Coordinate(i, c), cell)

    def update_all_gradually(self, session: Session) -> None:
        """Redraw every row after a whole screen, a batch per event-loop turn, the rows on
        screen first: 5,000 rows at once would hold the interface for about a second."""
        self._generation += 1
        generation = self._generation
        n = len(session.corridor.segments)
        top = max(self.scroll_offset.y - 1, 0)
        seen = list(range(top, min(top + self.size.height + 2, n)))
        order = seen + [i for i in range(n) if i < top or i >= top + len(seen)]

        def batch(start: int) -> None:
            if generation != self._generation or n != len(session.corridor.segments):
                return
            self.update_rows(order[start : start + BATCH], session)
            self.updating = start + BATCH < len(order)
            if self.updating:
                self.set_timer(0.005, partial(batch, start + BATCH))  # let other events run

        batch(0)

    def set_marked(self, rows: set[int], session: Session) -> None:
        """Show ``rows`` as the marked range (the id cell in reverse)."""
        changed = rows ^ self.marked
        self.marked = set(rows)
        for i in changed:
            if i < len(session.corridor.segments):
                self.update_cell_at(Coordinate(i, 0), self._cells(session, i)[0])
