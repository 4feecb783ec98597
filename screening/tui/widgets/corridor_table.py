"""The corridor table: a line per wall (its summary) and a line per segment under it.

What is shown and in what order comes from a :class:`~screening.tui.view.View`; the table
keeps the map from its lines to segment indices both ways. Id, Verdict and CDR are
frozen on the left, so they stay in sight however narrow the terminal or far the table is
scrolled sideways.
"""

from __future__ import annotations

from collections.abc import Iterable
from functools import partial

from rich.text import Text
from textual.binding import Binding
from textual.coordinate import Coordinate
from textual.widgets import DataTable

from screening.tui.cells import COLUMNS, FROZEN, column_heading, id_width, row_cells, wall_cells
from screening.tui.session import Session
from screening.tui.view import View, ViewRow

MARK_STYLE = "reverse"
BATCH = 100
"""Rows redrawn per event-loop turn in a gradual update (about 50 ms)."""
FEW_ROWS = 20
"""Up to this many edited rows are redrawn alone (each scans the table's render caches for
its own drawings); more are cheaper redrawn together, as a whole update is."""


class CorridorTable(DataTable):
    """Walls and their segments; ``lines[k]`` says what line ``k`` shows."""

    BINDINGS = [Binding("enter", "select_cursor", "Detail", tooltip="Open the segment's detail")]

    def __init__(self, **kwargs: object) -> None:
        super().__init__(cursor_type="row", zebra_stripes=True, **kwargs)
        self.fixed_columns = FROZEN
        self.marked: set[int] = set()
        """Segment indices of the marked range."""
        self.lines: list[ViewRow] = []
        self.position: dict[int, int] = {}
        """Segment index -> line."""
        self.wall_line: dict[str, int] = {}
        self.view = View()
        self._generation = 0
        self._id_width = 0
        self._made: dict[int, tuple[tuple, object, list[Text]]] = {}
        """Segment -> (what its cells were made from, the screen, the cells)."""
        self.updating = False
        """A gradual redraw of every row is under way."""

    def make_columns(self, session: Session, width: int | None = None) -> bool:
        """(Re)make the columns for the table's width and the session's units; True when
        they changed (the rows must then be loaded again)."""
        want = id_width(self.size.width if width is None else width)
        if want == self._id_width and self.columns:
            return False
        self._id_width = want
        self.clear(columns=True)
        for col in COLUMNS:
            label = column_heading(col.key, session.display)
            self.add_column(label, key=col.key, width=want if col.key == "id" else col.width)
        return True

    def relabel(self, session: Session) -> None:
        """Headings in the session's units."""
        for col in COLUMNS:
            self.columns[col.key].label = Text(column_heading(col.key, session.display))
        # DataTable keys its drawings by a count of changes that a new label does not
        # bump, and rows are replaced without it (_draw): count this one.
        self._update_count += 1
        self.refresh()

    def _update_dimensions(self, new_rows: Iterable[object]) -> None:
        """Every column has a fixed width and every row one line, so there is nothing to
        measure: skip DataTable's pass over every cell of the new rows (about 0.4 ms a
        row, two seconds that froze the interface after loading 5,000 segments).
        Overrides a private method of Textual 8's DataTable (pinned <9 in pyproject)."""
        super()._update_dimensions(())

    # ------------------------------------------------------------------ lines

    def segment_at(self, line: int | None = None) -> int | None:
        """Segment index of a line (the cursor's by default); None on a wall's line."""
        line = self.cursor_row if line is None else line
        if 0 <= line < len(self.lines):
            return self.lines[line].index
        return None

    def wall_at(self, line: int | None = None) -> str | None:
        line = self.cursor_row if line is None else line
        return self.lines[line].wall if 0 <= line < len(self.lines) else None

    def members(self, session: Session, wall: str) -> list[int]:
        return [i for i, s in enumerate(session.corridor.segments) if s.wall == wall]

    def _cells(self, session: Session, line: ViewRow, problems: set[str]) -> list[Text]:
        if line.index is None:
            members = self.members(session, line.wall)
            shown = sum(1 for r in self.lines if r.wall == line.wall and r.index is not None)
            folded = line.wall in self.view.collapsed
            return wall_cells(
                session.corridor,
                session.result,
                line.wall,
                members,
                folded=folded,
                stale=session.stale,
                display=session.display,
                shown=None if folded or not self.view.filtered else shown,
                width=self._id_width,
            )
        i = line.index
        seg = session.corridor.segments[i]
        pending, quick = session.pending(i), session.provisional(i)
        key = (
            id(seg),
            id(session.result),
            pending,
            id(quick[0]) if quick else None,
            session.display.system,
            seg.id in problems,
            self.view.grouped,
            i in self.marked,
        )
        hit = self._made.get(i)
        if hit is not None and hit[0] == key and hit[1] is seg:
            return hit[2]  # a view change redraws lines whose inputs and screen are the same
        cells = row_cells(
            seg,
            session.result,
            i,
            pending,
            quick,
            session.display,
            problem=seg.id in problems,
            indent=self.view.grouped,
        )
        if i in self.marked:
            cells[0] = Text(cells[0].plain, style=f"bold {MARK_STYLE}")
        self._made[i] = (key, seg, cells)
        return cells

    def load(self, session: Session, view: View, segment: int | None = 0) -> None:
        """Rebuild every line for ``view``; the cursor goes to ``segment`` (or its wall's
        line when it is folded or filtered out)."""
        self._generation += 1  # any gradual update of the old rows stops
        self.updating = False
        self.view = view
        self.make_columns(session)
        self.clear(columns=False)
        self.lines = view.rows(session.corridor, session.result)
        self.position = {r.index: k for k, r in enumerate(self.lines) if r.index is not None}
        self.wall_line = {r.wall: k for k, r in enumerate(self.lines) if r.index is None}
        problems = session.problem_ids()
        for k, line in enumerate(self.lines):
            self.add_row(*self._cells(session, line, problems), key=str(k))
        self.move_to(session, segment)

    def move_to(self, session: Session, segment: int | None) -> None:
        if not self.lines:
            return
        line = 0
        if segment is not None and segment in self.position:
            line = self.position[segment]
        elif segment is not None and 0 <= segment < len(session.corridor.segments):
            wall = session.corridor.segments[segment].wall
            line = self.wall_line.get(wall, 0)
        self.move_cursor(row=line, animate=False)

    def update_rows(self, rows: Iterable[int], session: Session) -> None:
        """Redraw segments ``rows`` in place, and the lines of their walls."""
        problems = session.problem_ids()
        rows = [i for i in rows if i < len(session.corridor.segments)]
        lines = [self.position[i] for i in rows if i in self.position]
        lines += [
            self.wall_line[w]
            for w in {session.corridor.segments[i].wall for i in rows}
            if w in self.wall_line
        ]
        self._draw(lines, session, problems, alone=len(lines) <= FEW_ROWS)

    def _draw(
        self, lines: list[int], session: Session, problems: set[str], alone: bool = False
    ) -> None:
        """Put new cells in ``lines``. DataTable's ``update_cell`` bumps one count that keys
        all its render caches, so each call made it draw every visible cell again (about
        150 ms of the UI thread at 160 columns for one edited row, under the lock the edit's
        own screen needs). Here the cells go in directly; then, for a few lines (``alone``),
        only their drawings are forgotten, else the count is bumped once for them all.
        Reads private parts of Textual 8's DataTable (pinned <9); the public way if they
        are not there."""
        made = [(line, self._cells(session, self.lines[line], problems)) for line in lines]
        if not all(self._put(line, cells) for line, cells in made):
            for line, cells in made:
                for c, cell in enumerate(cells):
                    self.update_cell_at(Coordinate(line, c), cell)
            return
        if alone:
            for line, _ in made:
                self._forget(line)
        elif made:
            self._update_count += 1
            self.refresh()

    def _put(self, line: int, cells: list[Text]) -> bool:
        try:
            data = self._data[self._row_locations.get_key(line)]
            keys = [self._column_locations.get_key(c) for c in range(len(cells))]
        except (AttributeError, KeyError, IndexError):
            return False
        data.update(zip(keys, cells, strict=True))
        return True

    def _forget(self, line: int) -> None:
        """Forget what was drawn of line ``line`` only, and redraw it."""
        row_key = self._row_locations.get_key(line)
        self._row_renderable_cache.discard((self._update_count, line))  # (count, line)
        for cache in (self._cell_render_cache, self._row_render_cache):  # keyed row first
            for k in [k for k in cache.keys() if k and k[0] == row_key]:  # noqa: SIM118 (no __iter__)
                cache.discard(k)
        self._line_cache.clear()  # whole screen lines, cheap to join again from the rows
        self.refresh_row(line)

    def update_all_gradually(self, session: Session) -> None:
        """Redraw every line after a whole screen, a batch per event-loop turn, the lines
        on screen first: 5,000 lines at once would hold the interface for about a second."""
        self._generation += 1
        generation = self._generation
        n = len(self.lines)
        top = max(self.scroll_offset.y - 1, 0)
        seen = list(range(top, min(top + self.size.height + 2, n)))
        order = seen + [k for k in range(n) if k < top or k >= top + len(seen)]
        segments = session.corridor.segments
        problems = session.problem_ids()

        def batch(start: int) -> None:
            if generation != self._generation or segments is not session.corridor.segments:
                return
            self._draw(order[start : start + BATCH], session, problems)
            self.updating = start + BATCH < len(order)
            if self.updating:
                self.set_timer(0.005, partial(batch, start + BATCH))  # let other events run

        batch(0)

    def set_marked(self, rows: set[int], session: Session) -> None:
        """Show segments ``rows`` as the marked range (the id cell in reverse)."""
        changed = rows ^ self.marked
        self.marked = set(rows)
        problems = session.problem_ids()
        for i in changed:
            line = self.position.get(i)
            if line is not None and i < len(session.corridor.segments):
                cell = self._cells(session, self.lines[line], problems)[0]
                self.update_cell_at(Coordinate(line, 0), cell)
