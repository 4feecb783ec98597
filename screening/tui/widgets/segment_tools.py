"""Beside the detail view's sketch: the segment's quantities and its sensitivity list."""

from __future__ import annotations

from rich.text import Text
from textual.app import ComposeResult
from textual.containers import VerticalScroll

from screening.model.errors import WallscreenError
from screening.tui.corridor_tools import rates_for, segment_quantities
from screening.tui.widgets.segment_quantities import SegmentQuantitiesPanel
from screening.tui.widgets.sensitivity_list import SensitivityList


class SegmentTools(VerticalScroll):
    """Quantities (at once) and sensitivity (on demand) of one segment."""

    def compose(self) -> ComposeResult:
        yield SegmentQuantitiesPanel(id="detail-quantities")
        yield SensitivityList(id="detail-sensitivity")

    def show(self, session, row: int) -> None:
        """Show segment ``row`` of ``session`` (None: a detail opened without a session)."""
        panel = self.query_one(SegmentQuantitiesPanel)
        sens = self.query_one(SensitivityList)
        if session is None or session.pending(row):
            self.display = session is not None
            return
        c, r, d = session.corridor, session.result, session.display
        try:
            q = segment_quantities(c, r, row, session.rates_override)
            panel.show(q, rates_for(c, session.rates_override), d)
        except WallscreenError as err:
            panel.show(None, None, d)
            panel.update(Text(f"quantities could not be worked out: {err}", style="red"))
        sens.show_for(c, row, r.verdict[row], d)

    def start_sensitivity(self, session, row: int) -> None:
        if session is None or session.pending(row):
            return
        self.query_one(SensitivityList).start(
            session.corridor, row, session.result, session.display
        )
