"""A one-line question: split chainage, file paths. Enter answers, Esc cancels.

An optional ``check`` callable is tried as the user types: when it raises a
:class:`~screening.model.errors.WallscreenError`, its message shows under the box and Enter is
refused, so a bad answer never reaches the operation.
"""

from __future__ import annotations

from collections.abc import Callable

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Input, Static

from screening.model.errors import WallscreenError


class PromptScreen(ModalScreen[str | None]):
    """Ask for one value."""

    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(
        self, title: str, label: str, value: str = "", check: Callable[[str], object] | None = None
    ) -> None:
        super().__init__(classes="dialog-screen")
        self.title_text, self.label, self.value, self.check = title, label, value, check

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static(Text(self.title_text, style="bold"), classes="dialog-title")
            yield Static(Text(self.label), classes="dialog-label")
            yield Input(value=self.value, id="prompt-input")
            yield Static("", id="prompt-why", classes="field-why")
            yield Static("Enter: accept · Esc: cancel", classes="dialog-help")

    def on_mount(self) -> None:
        self.query_one("#prompt-why").display = False
        self.query_one(Input).focus()

    def _problem(self, raw: str) -> str | None:
        if self.check is None:
            return None
        try:
            self.check(raw)
        except WallscreenError as err:
            return str(err)
        return None

    @on(Input.Changed, "#prompt-input")
    def _typed(self, event: Input.Changed) -> None:
        self._show(self._problem(event.value))

    def _show(self, problem: str | None) -> None:
        why = self.query_one("#prompt-why", Static)
        why.update(Text(problem or "", style="red"))
        why.display = problem is not None
        self.query_one(Input).set_class(problem is not None, "refused")

    @on(Input.Submitted, "#prompt-input")
    def _submitted(self, event: Input.Submitted) -> None:
        problem = self._problem(event.value)
        if problem is not None:
            self._show(problem)
            self.app.bell()
            return
        self.dismiss(event.value)

    def action_cancel(self) -> None:
        self.dismiss(None)
