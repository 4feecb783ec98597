"""The corridor table: one row per segment, inputs on the left, the screen on the right."""

from __future__ import annotations

from rich.text import Text
from textual.coordinate import Coordinate
from textual.widgets import DataTable

from screening.engine.result import CorridorResult
from screening.model import Corridor
from screening.tui.cells import COLUMNS, row_cells

MARK_STYLE = "reverse"


class CorridorTable(DataTable):
    """Segments in corridor order; the row index is the segment's index."""

    def __init__(self, **kwargs: object) -> None:
        super().__init__(cursor_type="row", zebra_stripes=True, **kwargs)
        self.marked: set[int] = set()

    def on_mount(self) -> None:
        for key, heading, width in COLUMNS:
            self.add_column(heading, key=key, width=width)

    def _cells(self, corridor: Corridor, result: CorridorResult | None, i: int) -> list[Text]:
        cells = row_cells(corridor.segments[i], result, i)
        if i in self.marked:
            cells[0] = Text(cells[0].plain, style=f"bold {MARK_STYLE}")
        return cells

    def load(self, corridor: Corridor, result: CorridorResult | None, cursor: int = 0) -> None:
        """Rebuild every row (after segments were added, removed or reordered)."""
        self.clear(columns=False)
        for i in range(len(corridor.segments)):
            self.add_row(*self._cells(corridor, result, i), key=str(i))
        if corridor.segments:
            self.move_cursor(row=max(0, min(cursor, len(corridor.segments) - 1)), animate=False)

    def update_rows(
        self, rows: tuple[int, ...] | range, corridor: Corridor, result: CorridorResult | None
    ) -> None:
        """Redraw ``rows`` in place (after an edit or a finished screen)."""
        for i in rows:
            for c, cell in enumerate(self._cells(corridor, result, i)):
                self.update_cell_at(Coordinate(i, c), cell)

    def set_marked(self, rows: set[int], corridor: Corridor, result: CorridorResult | None) -> None:
        """Show ``rows`` as the marked range (the id cell in reverse)."""
        changed = rows ^ self.marked
        self.marked = set(rows)
        for i in changed:
            if i < len(corridor.segments):
                self.update_cell_at(Coordinate(i, 0), self._cells(corridor, result, i)[0])
