"""About wallscreen, with the cautions. Also shown on the very first start."""

from __future__ import annotations

from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Vertical
from textual.screen import ModalScreen
from textual.widgets import Static

from screening import __version__

CAUTIONS = (
    "wallscreen is a screening tool, not a design tool.",
    "Its verdicts come from simplified checks and rules of thumb, meant to sort segments "
    "at option or preliminary stage; they are not a design and do not certify any wall.",
    "Verify every result with a licensed engineer and against the governing local code "
    "before anything is built.",
    "A segment marked clear still needs a full design by the designer of record; marginal "
    "and refer segments need more attention, not less.",
)


def about_text(first_start: bool) -> Text:
    out = Text()
    out.append(f"wallscreen {__version__}\n", style="bold")
    out.append(
        "Screens every reinforced-soil (MSE) wall segment of a road corridor: sizes the "
        "reinforcement, runs quick external and internal checks and says which segments "
        "need a full design.\n\n"
    )
    out.append("Cautions\n", style="bold")
    for line in CAUTIONS:
        out.append(f" ⚠ {line}\n")
    out.append("\n")
    out.append("Enter: I understand, start" if first_start else "Esc: close", style="dim")
    return out


class AboutScreen(ModalScreen[None]):
    """Cautions first: the user acknowledges them on the first start."""

    BINDINGS = [Binding("escape,enter,q,i", "close", "Close")]

    def __init__(self, first_start: bool = False) -> None:
        super().__init__(classes="dialog-screen")
        self.first_start = first_start

    def compose(self) -> ComposeResult:
        with Vertical(classes="dialog", id="about"):
            title = "Before you start" if self.first_start else "About"
            yield Static(Text(title, style="bold"), classes="dialog-title")
            yield Static(about_text(self.first_start))

    def action_close(self) -> None:
        self.dismiss(None)
