"""A one-line progress strip for a whole-corridor screen running in the background."""

from __future__ import annotations

from textual.app import ComposeResult
from textual.containers import Horizontal
from textual.widgets import Label, ProgressBar


class ProgressStrip(Horizontal):
    """``Screening 2,500 / 5,000 segments [#####     ] Esc cancels``."""

    DEFAULT_CSS = """
    ProgressStrip { height: 1; width: auto; display: none; }
    ProgressStrip.running { display: block; }
    ProgressStrip Label { width: auto; padding: 0 1; }
    ProgressStrip ProgressBar { width: 40; }
    """

    def compose(self) -> ComposeResult:
        yield Label("Screening", id="progress-label")
        yield ProgressBar(total=1, show_eta=False, id="progress-bar")
        yield Label("Esc cancels", id="progress-hint")

    def begin(self, total: int) -> None:
        self.add_class("running")
        self.query_one(ProgressBar).update(total=max(total, 1), progress=0)
        self.query_one("#progress-label", Label).update(f"Screening {total:,} segments")

    def advance(self, done: int, total: int) -> None:
        self.query_one(ProgressBar).update(total=max(total, 1), progress=done)
        self.query_one("#progress-label", Label).update(f"Screening {done:,} / {total:,}")

    def end(self) -> None:
        self.remove_class("running")
