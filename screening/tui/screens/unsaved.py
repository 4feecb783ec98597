"""The unsaved-changes guard before quitting or opening another file."""

from __future__ import annotations

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical
from textual.screen import ModalScreen
from textual.widgets import Button, Static


class UnsavedScreen(ModalScreen[str | None]):
    """Result: ``"save"``, ``"discard"`` or None (stay)."""

    BINDINGS = [
        Binding("escape", "stay", "Stay"),
        Binding("s", "answer('save')", "Save"),
        Binding("d", "answer('discard')", "Discard"),
    ]

    def __init__(self, what: str, doing: str) -> None:
        super().__init__(classes="dialog-screen")
        self.what, self.doing = what, doing

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static(Text("Unsaved changes", style="bold"), classes="dialog-title")
            yield Static(
                Text(
                    f"{self.what} has changes that are not saved. "
                    f"Save them before you {self.doing}?"
                ),
                classes="dialog-label",
            )
            with Horizontal(classes="dialog-buttons"):
                yield Button("Save (s)", id="save", variant="primary")
                yield Button("Discard (d)", id="discard", variant="error")
                yield Button("Stay (Esc)", id="stay")

    def on_mount(self) -> None:
        self.query_one("#save", Button).focus()

    @on(Button.Pressed)
    def _pressed(self, event: Button.Pressed) -> None:
        self.dismiss(None if event.button.id == "stay" else event.button.id)

    def action_answer(self, answer: str) -> None:
        self.dismiss(answer)

    def action_stay(self) -> None:
        self.dismiss(None)
