"""One line under the table: segments per verdict, wall length and face area, factor set."""

from __future__ import annotations

from textual.widgets import Static

from screening.engine.result import CorridorResult
from screening.model import Corridor
from screening.model.units import Display
from screening.tui.cells import SI, summary_text


class SummaryBar(Static):
    """The corridor at a glance."""

    def show(
        self,
        corridor: Corridor,
        result: CorridorResult | None,
        stale: set[int] | frozenset[int] = frozenset(),
        display: Display = SI,
        problems: int = 0,
    ) -> None:
        self.update(summary_text(corridor, result, stale, display, problems))
