"""Detail of one segment: its checks, the reasons for its verdict, the layers and a sketch.

``[`` and ``]`` step to the previous and next segment without going back to the table.
"""

from __future__ import annotations

from collections.abc import Callable

from rich.console import Group
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, Vertical, VerticalScroll
from textual.screen import Screen
from textual.widgets import Footer, Static

from screening.engine.result import SegmentResult
from screening.model import Segment
from screening.tui.cells import traffic_text, verdict_text
from screening.tui.widgets.check_table import checks_table, layers_table
from screening.tui.widgets.cross_section import CrossSection
from screening.tui.widgets.title_bar import CautionLine

Lookup = Callable[[int], tuple[Segment, SegmentResult] | None]


def heading(seg: Segment, res: SegmentResult) -> Text:
    out = Text()
    out.append(f" {seg.id} ", style="bold reverse")
    out.append(
        f"  {seg.wall}  ·  {seg.structure}  ·  chainage {seg.chainage_start_m:.1f}–"
        f"{seg.chainage_end_m:.1f} m  ·  "
    )
    out.append_text(verdict_text(res.verdict))
    return out


def facts(seg: Segment, res: SegmentResult) -> Text:
    return Text(
        f"exposed {res.exposed_height_m:.2f} m  + embedment {res.embedment_m:.2f} m  = "
        f"design height H {res.design_height_m:.2f} m\n"
        f"L {res.length_m:.1f} m (rule of thumb {res.rule_length_m:.1f} m)  ·  L/H "
        f"{res.length_ratio:.2f}  ·  traffic {traffic_text(seg.traffic)} → {res.traffic_kpa:.1f} kPa"
        f"  ·  fill {getattr(seg.fill, 'id', None) or 'inline'}  ·  "
        f"{getattr(seg.reinforcement, 'id', None) or 'inline'} at {seg.spacing_m:g} m"
    )


def reasons(res: SegmentResult) -> Text:
    out = Text("Why this verdict\n", style="bold")
    for line in res.reasons or ("no reasons given",):
        out.append(f" • {line}\n", style="")
    return out


class DetailScreen(Screen[None]):
    """Everything screening says about one segment."""

    BINDINGS = [
        Binding("escape,enter,q", "back", "Back"),
        Binding("left_square_bracket", "step(-1)", "Previous"),
        Binding("right_square_bracket", "step(1)", "Next"),
    ]

    def __init__(self, row: int, lookup: Lookup) -> None:
        super().__init__()
        self.row, self.lookup = row, lookup

    def compose(self) -> ComposeResult:
        seg, res = self.lookup(self.row)  # the caller only opens it for a screened row
        yield Static(heading(seg, res), id="detail-heading")
        yield Static(facts(seg, res), id="detail-facts")
        with Horizontal(id="detail-body"):
            with Vertical(id="detail-left"):
                yield Static(checks_table(res), id="detail-checks")
                yield Static(reasons(res), id="detail-reasons")
                with VerticalScroll(id="detail-layers-box"):
                    yield Static(layers_table(res), id="detail-layers")
            yield CrossSection(seg, res, id="detail-sketch")
        yield CautionLine(id="caution")
        yield Footer()

    def _show(self) -> None:
        found = self.lookup(self.row)
        if found is None:
            return
        seg, res = found
        self.query_one("#detail-heading", Static).update(heading(seg, res))
        self.query_one("#detail-facts", Static).update(facts(seg, res))
        self.query_one("#detail-checks", Static).update(checks_table(res))
        self.query_one("#detail-reasons", Static).update(reasons(res))
        self.query_one("#detail-layers", Static).update(Group(layers_table(res)))
        self.query_one(CrossSection).show(seg, res)

    def action_step(self, delta: int) -> None:
        if self.lookup(self.row + delta) is not None:
            self.row += delta
            self._show()

    def action_back(self) -> None:
        self.dismiss(None)
