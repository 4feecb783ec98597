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
from screening.tui.session import Change, Session
from screening.tui.widgets.corridor_table import CorridorTable
from screening.tui.widgets.long_section import LongSection
from screening.tui.widgets.progress_strip import ProgressStrip
from screening.tui.widgets.segment_editor import SegmentEditor, field_of
from screening.tui.widgets.summary_bar import SummaryBar
from screening.tui.widgets.title_bar import CautionLine, TitleBar

QUICK_ROWS = 20
"""Edits of up to this many rows show the built-in checks at once, before slip circles."""


def _bindings() -> list[Binding]:
    return [
        Binding(a.keys, a.action, a.title, show=a.footer, tooltip=a.help, id=a.action)
        for a in ACTIONS
    ]


class CorridorScreen(
    ToolsMixin, OperationsMixin, FilesMixin, MechanismMixin, ScreeningMixin, Screen[None]
):
    """Where the user spends the day."""

    BINDINGS = _bindings()

    def __init__(self, session: Session) -> None:
        super().__init__()
        self.session = session
        self.anchor: int | None = None
        """Start of the marked range (None: nothing marked)."""

    # ------------------------------------------------------------------ layout

    def compose(self) -> ComposeResult:
        yield TitleBar(id="title")
        with Horizontal(id="body"):
            yield CorridorTable(id="table")
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

    @property
    def table(self) -> CorridorTable:
        return self.query_one(CorridorTable)

    @property
    def editor(self) -> SegmentEditor:
        return self.query_one(SegmentEditor)

    @property
    def cursor(self) -> int:
        return self.table.cursor_row

    def reset(self, session: Session) -> None:
        """Show another corridor (after open), then screen it."""
        session.display = self.session.display  # the units chosen stay for the next file
        self.session = session
        self.anchor = None
        self.table.marked = set()
        self.table.load(session, 0)
        self.redraw_around()
        self.table.focus()
        if session.result is None:
            # after the first frame is on screen: the engine's thread competes for the GIL
            self.call_after_refresh(self.start_screen)

    # ------------------------------------------------------------------ redraw

    def redraw_around(self) -> None:
        """Title, summary and long section (cheap: no table rows)."""
        s = self.session
        self.query_one(TitleBar).show(s.corridor.name, s.path, s.dirty)
        self.query_one(SummaryBar).show(s.corridor, s.result, s.stale, s.display)
        self.query_one(LongSection).show(s.corridor, s.result, self.cursor, s.stale)

    def say(self, message: str, style: str = "") -> None:
        self.query_one("#status", Static).update(Text(message, style=style))

    def apply(self, change: Change | None) -> None:
        """Redraw after ``change``; screen the corridor again when rows were reshaped."""
        if change is None:
            self.say("nothing to undo or redo", "dim")
            return
        s = self.session
        if change.rows is not None and s.result is not None:
            if len(change.rows) <= QUICK_ROWS:
                with contextlib.suppress(WallscreenError):
                    s.quick_screen(list(change.rows))  # milliseconds: shown at once
            self.table.update_rows(change.rows, s)
        else:
            self._set_anchor(None)
            cursor = self.cursor if change.cursor is None else change.cursor
            self.table.load(s, cursor)
        self.redraw_around()
        self.say(change.label)
        if s.result is None:
            self.start_screen()
        else:
            self.screen_stale_rows()
        if self.editor.display and s.corridor.segments:
            self.editor.refresh_values(s.corridor.segments[self.cursor], skip=self._typing())

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
        s = self.session
        self.query_one(LongSection).show(s.corridor, s.result, self.cursor, s.stale)

    @on(DataTable.RowSelected, "#table")
    def _selected(self, event: DataTable.RowSelected) -> None:
        self.action_open_detail()

    def _set_anchor(self, anchor: int | None) -> None:
        self.anchor = anchor
        rows = (
            set()
            if anchor is None
            else set(range(min(anchor, self.cursor), max(anchor, self.cursor) + 1))
        )
        self.table.set_marked(rows, self.session)

    def selected_rows(self) -> list[int]:
        """The marked range, or the cursor's row when nothing is marked."""
        if self.anchor is None:
            return [self.cursor]
        return sorted(self.table.marked)

    def action_mark_range(self) -> None:
        if self.anchor is None:
            self._set_anchor(self.cursor)
            self.say("range marked from here: move the cursor to extend it; Space or Esc clears it")
        else:
            self._set_anchor(None)
            self.say("range cleared")

    def action_next_referred(self) -> None:
        result = self.session.result
        if result is None:
            return
        n = len(result)
        for step in range(1, n + 1):
            i = (self.cursor + step) % n
            if result.verdict[i] == "refer":
                self.table.move_cursor(row=i)
                return
        self.say("no segment is referred")

    # ------------------------------------------------------------------ detail

    def _lookup(self, row: int):
        s = self.session
        if not 0 <= row < len(s.corridor.segments) or s.pending(row):
            return None
        return s.corridor.segments[row], s.result.segment(row)

    def action_open_detail(self) -> None:
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

        self.app.push_screen(PresetsScreen(self.session.presets))

    # ------------------------------------------------------------------ editor

    async def action_edit_segment(self) -> None:
        if not self.session.corridor.segments:
            return
        await self.editor.build()
        self.editor.display = True
        self.editor.load(self.session.corridor.segments[self.cursor])
        self.editor.query_one(Input).focus()
        self.say("editing: values are checked and applied as you type; Esc returns to the table")

    def close_editor(self) -> None:
        self.session.end_edit()
        self.editor.display = False
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
        if event.value == display(segment, name):
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
