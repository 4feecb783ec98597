"""The cross-section sketch of one segment, drawn to the widget's size."""

from __future__ import annotations

from rich.text import Text
from textual.widget import Widget

from screening.engine.result import SegmentResult
from screening.model import Segment
from screening.model.units import Display
from screening.tui.sketch import SI, draw_section


class CrossSection(Widget):
    """Facing, layers to L, line of maximum tension, ground, surcharges, embedment."""

    def __init__(
        self, segment: Segment, result: SegmentResult, display: Display = SI, **kwargs: object
    ) -> None:
        super().__init__(**kwargs)
        self.segment, self.result, self.units = segment, result, display

    def show(self, segment: Segment, result: SegmentResult, display: Display = SI) -> None:
        self.segment, self.result, self.units = segment, result, display
        self.refresh()

    def render(self) -> Text:
        size = self.content_size
        if size.width < 20 or size.height < 8:
            return Text("(widen the terminal to see the sketch)", style="dim")
        return draw_section(self.segment, self.result, size.width, size.height, self.units)
