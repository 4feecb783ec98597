"""Ask where to write a report, and whether to rank the inputs of flagged segments.

The report type follows the file's ending (.html with figures, .md, .csv). A path that
would not do shows why under the box and Enter is refused.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Checkbox, Input, Static

from screening.model.errors import WallscreenError
from screening.tui.completion import PathSuggester
from screening.tui.corridor_tools import check_report_path


@dataclass(frozen=True)
class ExportChoice:
    path: Path
    sensitivity: bool
    """Rank the inputs of every referred and marginal segment (runs the engine again)."""


class ExportScreen(ModalScreen[ExportChoice | None]):
    BINDINGS = [Binding("escape", "cancel", "Cancel")]

    def __init__(self, suggested: str, units: str, flagged: int) -> None:
        super().__init__(classes="dialog-screen")
        self.suggested, self.units, self.flagged = suggested, units, flagged

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog"):
            yield Static(Text("Export a report", style="bold"), classes="dialog-title")
            yield Static(
                Text(
                    "Path of the report: .html (one file, figures inside), .md or .csv. "
                    f"Numbers in {self.units.upper()} units, as on screen; the cautions go "
                    "with it."
                ),
                classes="dialog-label",
            )
            yield Input(
                value=self.suggested,
                id="export-path",
                suggester=PathSuggester((".html", ".htm", ".md", ".csv")),
            )
            yield Static("", id="export-why", classes="field-why")
            yield Checkbox(
                f"Rank the inputs of the {self.flagged} referred and marginal segments (slower)",
                value=True,
                id="export-sensitivity",
            )
            yield Static(
                "→: complete the path · Enter: write · Tab: options · Esc: cancel",
                classes="dialog-help",
            )

    def on_mount(self) -> None:
        self.query_one("#export-why").display = False
        self.query_one("#export-path", Input).focus()

    def _problem(self, raw: str) -> str | None:
        try:
            check_report_path(raw)
        except WallscreenError as err:
            return getattr(err, "message", str(err))
        return None

    def _show(self, problem: str | None) -> None:
        why = self.query_one("#export-why", Static)
        why.update(Text(problem or "", style="red"))
        why.display = problem is not None
        self.query_one("#export-path", Input).set_class(problem is not None, "refused")

    @on(Input.Changed, "#export-path")
    def _typed(self, event: Input.Changed) -> None:
        self._show(self._problem(event.value))

    @on(Input.Submitted, "#export-path")
    def _submitted(self, event: Input.Submitted) -> None:
        problem = self._problem(event.value)
        if problem is not None:
            self._show(problem)
            self.app.bell()
            return
        sensitivity = self.query_one("#export-sensitivity", Checkbox).value
        self.dismiss(ExportChoice(check_report_path(event.value), sensitivity))

    def action_cancel(self) -> None:
        self.dismiss(None)
