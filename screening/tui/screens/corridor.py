"""The corridor screen: the table of segments, the editor beside it, the summary line and
the long section under it. Corridor operations and file actions live in their own mixins
(``operations.py``, ``files.py``); whole-corridor screens run in ``screening_worker.py``."""

from __future__ import annotations

import contextlib

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal
from textual.screen import Screen
from textual.widgets import DataTable, Footer, Input, Static

from screening.model.errors import WallscreenError
from screening.tui.fields import display
from screening.tui.keys import ACTIONS
from screening.tui.screens.detail import DetailScreen
from screening.tui.screens.files import FilesMixin
from screening.tui.screens.mechanism_worker import MechanismMixin
from screening.tui.screens.operations import OperationsMixin
from screening.tui.screens.screening_worker import ScreeningMixin
from screening.tui.screens.tools import ToolsMixin
from screening.tui.screens.view_actions import ViewMixin
from screening.tui.session import Change, Session
from screening.tui.view import View
from screening.tui.widgets.corridor_table import CorridorTable
from screening.tui.widgets.long_section import LongSection
from screening.tui.widgets.progress_strip import ProgressStrip
from screening.tui.widgets.segment_editor import SegmentEditor, field_of
from screening.tui.widgets.summary_bar import SummaryBar
from screening.tui.widgets.title_bar import CautionLine, TitleBar

EMPTY_HELP = Text.assemble(
    ("This corridor has no segments yet.\n\n", "bold"),
    ("  a    ", "bold"),
    "add the first segment, then type its chainage, heights and inputs in the editor\n",
    ("  ^o   ", "bold"),
    "open a corridor file          ",
    ("r ", "bold"),
    "a recent one\n",
    ("  ?    ", "bold"),
    "every key\n\n",
    "Or make one from a road profile on the command line:\n",
    ("  wallscreen new FILE.toml --from-profile PROFILE.csv\n", "italic"),
)
"""What the corridor screen says when there is nothing in it."""

QUICK_ROWS = 20
"""Edits of up to this many rows show the built-in checks at once, before slip circles."""
NARROW = 110
"""Below this many columns the editor replaces the table instead of sitting beside it."""
SHORT = 32
"""Below this many lines the long section shrinks to give the table room."""


FOOTER_FIRST = ("help", "quit")
"""Shown first in the footer, so a narrow terminal still shows how to get help and out."""


def _bindings() -> list[Binding]:
    order = sorted(ACTIONS, key=lambda a: a.action not in FOOTER_FIRST)
    return [
        Binding(a.keys, a.action, a.title, show=a.footer, tooltip=a.help, id=a.action)
        for a in order
    ]


class CorridorScreen(
    ViewMixin, ToolsMixin, OperationsMixin, FilesMixin, MechanismMixin, ScreeningMixin, Screen[None]
):
    """Where the user spends the day."""

    BINDINGS = _bindings()

    def __init__(self, session: Session) -> None:
        super().__init__()
        self.session = session
        self.anchor: int | None = None
        """Segment where the marked range starts (None: nothing marked)."""
        self.view = View()
        """What the table shows: grouping, folded walls, filters, sort."""

    # ------------------------------------------------------------------ layout

    def compose(self) -> ComposeResult:
        yield TitleBar(id="title")
        with Horizontal(id="body"):
            yield CorridorTable(id="table")
            yield Static(EMPTY_HELP, id="empty")
            yield SegmentEditor(id="editor")
        yield SummaryBar(id="summary")
        yield LongSection(id="long-section")
        with Horizontal(id="status-row"):  # one line whatever shows: the table never jumps
            yield Static("", id="status")
            yield ProgressStrip(id="progress")
        yield CautionLine(id="caution")
        yield Footer()

    def on_mount(self) -> None:
        self.query_one("#editor").display = False
        self.reset(self.session)

    def on_resize(self) -> None:
        """Narrow terminals: the editor takes the table's place; the Id column shrinks."""
        narrow = self.size.width < NARROW
        self.set_class(narrow, "narrow")
        self.set_class(self.size.height < SHORT, "short")
        if self.table.make_columns(self.session, self.size.width - 4):
            self.table.load(self.session, self.view, self.cursor if self.table.lines else 0)

    @property
    def table(self) -> CorridorTable:
        return self.query_one(CorridorTable)

    @property
    def editor(self) -> SegmentEditor:
        return self.query_one(SegmentEditor)

    @property
    def cursor(self) -> int:
        """Segment under the cursor; on a wall's line, that wall's first segment."""
        i = self.table.segment_at()
        if i is not None:
            return i
        wall = self.table.wall_at()
        members = self.table.members(self.session, wall) if wall is not None else []
        return members[0] if members else 0

    @property
    def cursor_segment(self) -> int | None:
        """Segment under the cursor, or None on a wall's line or an empty corridor."""
        return self.table.segment_at()

    @property
    def on_wall_line(self) -> bool:
        return bool(self.table.lines) and self.table.segment_at() is None

    def reset(self, session: Session) -> None:
        """Show another corridor (after open), then screen it."""
        session.display = self.session.display  # the units chosen stay for the next file
        self.session = session
        self.anchor = None
        self.table.marked = set()
        self.view = View()
        self.table.load(session, self.view, 0)
        self.redraw_around()
        self.table.focus()
        if session.result is None and session.corridor.segments:
            # after the first frame is on screen: the engine's thread competes for the GIL
            self.call_after_refresh(self.start_screen)

    # ------------------------------------------------------------------ redraw

    def redraw_around(self) -> None:
        """Title, summary and long section (cheap: no table rows)."""
        s = self.session
        self.set_class(not s.corridor.segments, "empty")
        self.query_one(TitleBar).show(s.corridor.name, s.path, s.dirty)
        self.query_one(SummaryBar).show(
            s.corridor, s.result, s.stale, s.display, len(s.layout_problems())
        )
        self.show_section()

    def show_section(self) -> None:
        """The long section of the cursor's wall."""
        s = self.session
        self.query_one(LongSection).show(s.corridor, s.result, self.cursor, s.stale, s.display)

    def say(self, message: str, style: str = "") -> None:
        self.query_one("#status", Static).update(Text(message, style=style))

    def apply(self, change: Change | None) -> None:
        """Redraw after ``change``; screen the corridor again when rows were reshaped."""
        if change is None:
            self.say("nothing to undo or redo", "dim")
            return
        s = self.session
        problems = {p.describe() for p in s.layout_problems()}
        if change.rows is not None and s.result is not None:
            if len(change.rows) <= QUICK_ROWS:
                with contextlib.suppress(WallscreenError):
                    s.quick_screen(list(change.rows))  # milliseconds: shown at once
            self.table.update_rows(change.rows, s)
        else:
            self._set_anchor(None)
            cursor = self.cursor if change.cursor is None else change.cursor
            self.table.load(s, self.view, cursor)
        new = [p for p in s.layout_problems() if p.describe() not in problems]
        self.redraw_around()
        self.say(change.label)
        if new:
            self.say(f"{change.label} · ⚠ {new[0].describe()}", "bold yellow")
        if s.result is None and s.corridor.segments:
            self.start_screen()
        else:
            self.screen_stale_rows()
        self.refresh_editor()

    def refresh_editor(self) -> None:
        """The open editor shows the segment's values and outcome as they are now."""
        s = self.session
        if self.editor.display and s.corridor.segments:
            i = self.cursor
            self.editor.refresh_values(s.corridor.segments[i], skip=self._typing(), units=s.display)
            self.editor.show_outcome(s, i)

    def _typing(self) -> str | None:
        focused = self.app.focused
        if isinstance(focused, Input) and focused.id and focused.id.startswith("field-"):
            return field_of(focused.id)
        return None

    # ------------------------------------------------------------------ cursor and range

    @on(DataTable.RowHighlighted, "#table")
    def _moved(self, event: DataTable.RowHighlighted) -> None:
        if self.anchor is not None:
            self._set_anchor(self.anchor)
        self.show_section()

    @on(DataTable.RowSelected, "#table")
    def _selected(self, event: DataTable.RowSelected) -> None:
        if self.on_wall_line:
            self.action_fold_wall()
        else:
            self.action_open_detail()

    def _set_anchor(self, anchor: int | None) -> None:
        """Mark from segment ``anchor`` to the cursor, within the anchor's wall only."""
        self.anchor = anchor
        rows: set[int] = set()
        table = self.table
        if anchor is not None and anchor in table.position:
            wall = self.session.corridor.segments[anchor].wall
            a, b = sorted((table.position[anchor], table.cursor_row))
            rows = {
                line.index
                for line in table.lines[a : b + 1]
                if line.index is not None and line.wall == wall
            }
        elif anchor is not None:
            self.anchor = None
        table.set_marked(rows, self.session)

    def selected_rows(self) -> list[int]:
        """The marked range, or the cursor's segment when nothing is marked; on a wall's
        line with nothing marked, every segment of that wall shown."""
        if self.anchor is None:
            if self.on_wall_line:
                wall = self.table.wall_at()
                shown = [
                    r.index for r in self.table.lines if r.wall == wall and r.index is not None
                ]
                return shown or self.table.members(self.session, wall)
            return [self.cursor]
        return sorted(self.table.marked)

    def action_mark_range(self) -> None:
        if self.anchor is None:
            if self.cursor_segment is None:
                self.say("on a wall's line: b edits the whole wall; Space marks from a segment")
                return
            self._set_anchor(self.cursor_segment)
            self.say(
                "range marked from here: move the cursor to extend it (it stays within this "
                "wall); Space or Esc clears it"
            )
        else:
            self._set_anchor(None)
            self.say("range cleared")

    def action_next_referred(self) -> None:
        result = self.session.result
        lines = self.table.lines
        if result is None or not lines:
            return
        n = len(lines)
        for step in range(1, n + 1):
            k = (self.table.cursor_row + step) % n
            i = lines[k].index
            if i is not None and result.verdict[i] == "refer" and i not in self.session.stale:
                self.table.move_cursor(row=k)
                return
        self.say("no segment shown is referred")

    # ------------------------------------------------------------------ detail

    def _lookup(self, row: int):
        s = self.session
        if not 0 <= row < len(s.corridor.segments) or s.pending(row):
            return None
        return s.corridor.segments[row], s.result.segment(row)

    def action_open_detail(self) -> None:
        if not self.session.corridor.segments:
            return
        if self._lookup(self.cursor) is None:
            self.say("this segment is being screened: the detail opens once it is done", "yellow")
            return
        units = self.session.display
        self.app.push_screen(
            DetailScreen(self.cursor, self._lookup, self.session),
            lambda _: self.show_units() if self.session.display != units else self.redraw_around(),
        )

    # ------------------------------------------------------------------ help

    def action_help(self) -> None:
        from screening.tui.screens.help import HelpScreen

        self.app.push_screen(HelpScreen())

    def action_about(self) -> None:
        from screening.tui.screens.about import AboutScreen

        self.app.push_screen(AboutScreen())

    def action_presets(self) -> None:
        from screening.tui.screens.presets import PresetsScreen

        self.app.push_screen(PresetsScreen(self.session.presets, self.session.display))

    # ------------------------------------------------------------------ editor

    async def action_edit_segment(self) -> None:
        s = self.session
        if not s.corridor.segments:
            self.say("no segment to edit yet: a adds the first one", "yellow")
            return
        if self.on_wall_line:
            self.table.move_to(s, self.cursor)  # the wall's first segment
        await self.editor.build(s.presets)
        self.editor.display = True
        self.set_class(True, "editing")
        self.editor.load(s.corridor.segments[self.cursor], s.display)
        self.editor.show_outcome(s, self.cursor)
        self.editor.query_one(Input).focus()
        self.say(f"editing ({s.display.system.upper()}): applied as you type; Esc: back")

    def close_editor(self) -> None:
        self.session.end_edit()
        self.editor.display = False
        self.set_class(False, "editing")
        self.table.focus()

    @on(Input.Submitted, "#editor Input")
    def _editor_done(self, event: Input.Submitted) -> None:
        self.close_editor()

    @on(Input.Changed, "#editor Input")
    def _editor_typed(self, event: Input.Changed) -> None:
        event.stop()
        name = field_of(event.input.id or "")
        row = self.cursor
        segment = self.session.corridor.segments[row]
        if event.value == display(segment, name, self.session.display):
            self.editor.show_problem(name, None)
            return
        try:
            change = self.session.edit_field(row, name, event.value)
        except WallscreenError as err:
            self.editor.show_problem(name, getattr(err, "message", str(err)))
            return
        self.editor.show_problem(name, None)
        self.apply(change)

    def action_cancel_screen(self) -> None:
        if self.editor.display:
            self.close_editor()
        elif self.screening:
            self.cancel_screen()
        elif self.anchor is not None:
            self._set_anchor(None)
            self.say("range cleared")
        elif self.mechanism_running:
            self.cancel_mechanism()
        elif self.view != View(grouped=self.view.grouped, collapsed=self.view.collapsed):
            self.set_view(View(grouped=self.view.grouped, collapsed=self.view.collapsed))
            self.say("filters and sort cleared: every segment, in chainage order")
