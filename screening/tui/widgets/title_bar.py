"""Top line: corridor name, file, unsaved mark; and the standing caution."""

from __future__ import annotations

from pathlib import Path

from rich.text import Text
from textual.widgets import Static

CAUTION = (
    "Screening only, not a design: verify with a licensed engineer and the governing local code."
)
SHORT_CAUTION = "Screening only, not a design: a licensed engineer and the local code decide."
"""The same caution in 80 columns."""


class TitleBar(Static):
    """``wallscreen · <corridor> · <file> [unsaved]``."""

    def show(self, name: str, path: Path | None, dirty: bool) -> None:
        out = Text()
        out.append(" wallscreen ", style="bold reverse")
        out.append(f"  {name}  ", style="bold")
        out.append(
            path.name if path is not None else "demo corridor (unsaved copy)", style="italic"
        )
        if dirty:
            out.append("  ● unsaved changes", style="yellow")
        self.update(out)


class CautionLine(Static):
    """The caution that stays on screen."""

    def on_mount(self) -> None:
        self.update(Text("⚠ " + CAUTION))

    def on_resize(self) -> None:
        fits = self.content_size.width >= len(CAUTION) + 2
        self.update(Text("⚠ " + (CAUTION if fits else SHORT_CAUTION)))
