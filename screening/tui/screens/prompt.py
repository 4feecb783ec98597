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
from textual.suggester import SuggestFromList
from textual.widgets import Input, Static

from screening.model.errors import WallscreenError
from screening.tui.completion import PathSuggester, path_matches


class PromptScreen(ModalScreen[str | None]):
    """Ask for one value."""

    BINDINGS = [
        Binding("escape", "cancel", "Cancel"),
        Binding("tab", "complete", "Complete", show=False, priority=True),
    ]

    def __init__(
        self,
        title: str,
        label: str,
        value: str = "",
        check: Callable[[str], object] | None = None,
        *,
        paths: tuple[str, ...] | None = None,
        words: list[str] | None = None,
    ) -> None:
        """``paths``: complete file paths with these suffixes (() for any file);
        ``words``: complete from these values (preset ids and the like)."""
        super().__init__(classes="dialog-screen")
        self.title_text, self.label, self.value, self.check = title, label, value, check
        self.paths, self.words = paths, words

    def compose(self) -> ComposeResult:
        suggester = None
        helps = "Enter: accept · Esc: cancel"
        if self.paths is not None:
            suggester = PathSuggester(self.paths)
            helps = "Tab: complete the path · Enter: accept · Esc: cancel"
        elif self.words:
            suggester = SuggestFromList(self.words, case_sensitive=False)
            helps = f"Tab: complete ({', '.join(self.words[:8])}) · Enter: accept · Esc: cancel"
        with Vertical(classes="dialog"):
            yield Static(Text(self.title_text, style="bold"), classes="dialog-title")
            yield Static(Text(self.label), classes="dialog-label")
            yield Input(value=self.value, id="prompt-input", suggester=suggester)
            yield Static("", id="prompt-why", classes="field-why")
            yield Static("", id="prompt-matches", classes="dialog-help")
            yield Static(helps, classes="dialog-help")

    def action_complete(self) -> None:
        """Take the grey completion; with several paths possible, list them."""
        box = self.query_one(Input)
        if box._suggestion and box._suggestion.startswith(box.value):
            box.value = box._suggestion
            box.cursor_position = len(box.value)
        if self.paths is not None:
            matches = path_matches(box.value, self.paths)
            shown = "  ".join(m.rsplit("/", 2)[-1] or m for m in matches[:12])
            more = f"  … {len(matches) - 12} more" if len(matches) > 12 else ""
            words = f"{len(matches)} match(es): {shown}{more}" if len(matches) > 1 else ""
            self.query_one("#prompt-matches", Static).update(Text(words))

    def on_mount(self) -> None:
        self.query_one("#prompt-why").display = False
        box = self.query_one(Input)
        box.focus()
        box.cursor_position = len(box.value)

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
