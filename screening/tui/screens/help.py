"""Every key of the corridor screen, grouped, built from the same table as the bindings."""

from __future__ import annotations

from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.screen import ModalScreen
from textual.widgets import Static

from screening.tui.keys import ACTIONS, all_keys

EXTRA = (
    (
        "Editor",
        "Tab / Shift+Tab",
        "Next / previous field; every valid value is applied as you type.",
    ),
    ("Editor", "Enter / Esc", "Back to the table (the edits stay; u undoes them)."),
    ("Editor", "F4", "Pick a preset id or a word (wall | abutment, ...) from a list."),
    ("Table", "Enter on a wall", "Fold or unfold the wall; a heading clicked sorts by it."),
    ("Dialogs", "Tab", "Complete a file path or a word."),
    ("Detail", "[ / ]", "Previous / next segment."),
    ("Detail", "Esc", "Back to the table."),
    ("Anywhere", "^p", "Command palette: every action by name."),
)


def keys_table() -> Table:
    table = Table(box=None, expand=True, show_header=False, pad_edge=False)
    table.add_column("key", style="bold", no_wrap=True, width=18)
    table.add_column("what")
    group = None
    rows = [(a.group, all_keys(a.keys), f"{a.title}: {a.help}") for a in ACTIONS]
    for grp, keys, text in rows + list(EXTRA):
        if grp != group:
            table.add_row(Text(""), Text(""))
            table.add_row(Text(grp, style="bold underline"), Text(""))
            group = grp
        table.add_row(keys, text)
    return table


class HelpScreen(ModalScreen[None]):
    BINDINGS = [Binding("escape,q,question_mark,f1", "close", "Close")]

    def __init__(self) -> None:
        super().__init__(classes="dialog-screen")

    def compose(self) -> ComposeResult:
        with VerticalScroll(classes="dialog wide"):
            yield Static(Text("Keys", style="bold"), classes="dialog-title")
            yield Static(keys_table())
            yield Static("Esc: close", classes="dialog-help")

    def action_close(self) -> None:
        self.dismiss(None)
