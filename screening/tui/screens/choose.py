"""Pick one of a few options (factor set, recent file, field). Enter picks, Esc cancels."""

from __future__ import annotations

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import OptionList, Static
from textual.widgets.option_list import Option


class ChooseScreen(ModalScreen[str | None]):
    """``options`` are (value, label) pairs; the result is the value picked."""

    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(
        self, title: str, options: list[tuple[str, str]], current: str | None = None, note: str = ""
    ) -> None:
        super().__init__(classes="dialog-screen")
        self.title_text, self.options, self.current, self.note = title, options, current, note

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static(Text(self.title_text, style="bold"), classes="dialog-title")
            if self.note:
                yield Static(Text(self.note), classes="dialog-label")
            yield OptionList(
                *[
                    Option(Text(("• " if v == self.current else "  ") + label), id=v)
                    for v, label in self.options
                ],
                id="choices",
            )
            yield Static("Enter: choose · Esc: cancel", classes="dialog-help")

    def on_mount(self) -> None:
        choices = self.query_one(OptionList)
        choices.focus()
        values = [v for v, _ in self.options]
        if self.current in values:
            choices.highlighted = values.index(self.current)

    @on(OptionList.OptionSelected)
    def _picked(self, event: OptionList.OptionSelected) -> None:
        self.dismiss(event.option.id)

    def action_cancel(self) -> None:
        self.dismiss(None)
