"""Detail of one segment: its checks, the reasons for its verdict, the layers and a sketch.

``[`` and ``]`` step to the previous and next segment without going back to the table.
Beside the sketch: the segment's quantities, and (``v``) its inputs ranked by how much
they move the outcome. ``t`` switches the display units.
"""

from __future__ import annotations

from collections.abc import Callable

from rich.console import Group
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import ScrollableContainer, Vertical, VerticalScroll
from textual.screen import Screen
from textual.widgets import Footer, Static

from screening.engine.result import SegmentResult
from screening.model import Segment
from screening.model.units import Display, in_words
from screening.tui.cells import SI, traffic_text, verdict_text
from screening.tui.config import remember_units
from screening.tui.keys import binding_for
from screening.tui.widgets.check_table import checks_table, layers_table
from screening.tui.widgets.cross_section import CrossSection
from screening.tui.widgets.mechanism_view import MechanismView
from screening.tui.widgets.segment_tools import SegmentTools
from screening.tui.widgets.title_bar import CautionLine

NARROW = 150
Lookup = Callable[[int], tuple[Segment, SegmentResult] | None]


def heading(seg: Segment, res: SegmentResult, display: Display = SI) -> Text:
    out = Text()
    out.append(f" {seg.id} ", style="bold reverse")
    m = display.value
    out.append(
        f"  {seg.wall}  ·  {seg.structure}  ·  chainage {m(seg.chainage_start_m, 'm'):.1f}–"
        f"{m(seg.chainage_end_m, 'm'):.1f} {display.label('m')}  ·  "
    )
    out.append_text(verdict_text(res.verdict))
    return out


def facts(seg: Segment, res: SegmentResult, display: Display = SI) -> Text:
    f = display.format
    return Text(
        f"exposed {f(res.exposed_height_m, 'm')}  + embedment {f(res.embedment_m, 'm')}  = "
        f"design height Hd {f(res.design_height_m, 'm')}\n"
        f"L {f(res.length_m, 'm', 1)} set by {res.length_set_by}"
        + (
            ""
            if res.length_set_by == "rule of thumb"
            else f" (rule of thumb {f(res.rule_length_m, 'm', 1)})"
        )
        + "  ·  L/Hd "
        f"{res.length_ratio:.2f}  ·  traffic {traffic_text(seg.traffic, display)} → "
        f"{f(res.traffic_kpa, 'kPa')}"
        f"  ·  fill {getattr(seg.fill, 'id', None) or 'inline'}  ·  "
        f"{getattr(seg.reinforcement, 'id', None) or 'inline'} at {f(seg.spacing_m, 'm')}"
    )


def reasons(res: SegmentResult, display: Display = SI) -> Text:
    out = Text("Why this verdict\n", style="bold")
    for line in res.reasons or ("no reasons given",):
        out.append(f" • {in_words(line, display)}\n", style="")
    return out


class DetailScreen(Screen[None]):
    """Everything screening says about one segment."""

    DEFAULT_CSS = """
    #detail-body { layout: horizontal; }
    #detail-right { width: 1fr; }
    DetailScreen.narrow #detail-body { layout: vertical; }
    DetailScreen.narrow #detail-left { width: 1fr; height: auto; }
    DetailScreen.narrow #detail-layers-box { height: auto; }
    DetailScreen.narrow #detail-right { width: 1fr; height: auto; }
    DetailScreen.narrow #detail-right #detail-sketch { height: 18; }
    DetailScreen.narrow #detail-tools { max-height: 100%; }
    #detail-right #detail-sketch { width: 1fr; height: 1fr; min-height: 12; }
    #detail-tools { height: auto; max-height: 65%; border: round $panel-lighten-2; padding: 0 1; }
    #detail-sensitivity { margin-top: 1; }
    """

    BINDINGS = [
        Binding("escape,enter,q", "back", "Back"),
        Binding("left_square_bracket", "step(-1)", "Previous"),
        Binding("right_square_bracket", "step(1)", "Next"),
        binding_for("sensitivity", show=True),
        binding_for("toggle_units", show=True),
    ]
    PALETTE_ACTIONS = ("sensitivity", "toggle_units")
    """Corridor-screen actions the command palette runs here instead."""

    def __init__(self, row: int, lookup: Lookup, session=None) -> None:
        super().__init__()
        self.row, self.lookup, self.session = row, lookup, session

    @property
    def display_units(self) -> Display:
        return self.session.display if self.session is not None else SI

    def compose(self) -> ComposeResult:
        seg, res = self.lookup(self.row)  # the caller only opens it for a screened row
        d = self.display_units
        yield Static(heading(seg, res, d), id="detail-heading")
        yield Static(facts(seg, res, d), id="detail-facts")
        with ScrollableContainer(id="detail-body"):
            with Vertical(id="detail-left"):
                yield Static(checks_table(res, d), id="detail-checks")
                yield Static(reasons(res, d), id="detail-reasons")
                with VerticalScroll(id="detail-layers-box"):
                    yield Static(layers_table(res, d), id="detail-layers")
            with Vertical(id="detail-right"):
                yield CrossSection(seg, res, d, id="detail-sketch")
                yield MechanismView(self.session, self.row, id="detail-mechanism")
                yield SegmentTools(id="detail-tools")
        yield CautionLine(id="caution")
        yield Footer()

    def _show(self) -> None:
        found = self.lookup(self.row)
        if found is None:
            return
        seg, res = found
        d = self.display_units
        self.query_one("#detail-heading", Static).update(heading(seg, res, d))
        self.query_one("#detail-facts", Static).update(facts(seg, res, d))
        self.query_one("#detail-checks", Static).update(checks_table(res, d))
        self.query_one("#detail-reasons", Static).update(reasons(res, d))
        self.query_one("#detail-layers", Static).update(Group(layers_table(res, d)))
        self.query_one(CrossSection).show(seg, res, d)
        self.query_one(MechanismView).show(self.row)
        self.query_one(SegmentTools).show(self.session, self.row)

    def on_mount(self) -> None:
        self.query_one(SegmentTools).show(self.session, self.row)

    def on_resize(self) -> None:
        """Below 150 columns the checks take the whole width and the sketch goes under
        them (the body scrolls), so no column of the check table is cut."""
        self.set_class(self.size.width < NARROW, "narrow")

    def action_sensitivity(self) -> None:
        """Rank the inputs of this segment (a thread worker; kept for the same inputs)."""
        self.query_one(SegmentTools).start_sensitivity(self.session, self.row)

    def action_toggle_units(self) -> None:
        if self.session is not None:
            system = "us" if self.session.display.system == "si" else "si"
            self.session.display = Display(system)
            remember_units(system)
            self._show()

    def action_step(self, delta: int) -> None:
        if self.lookup(self.row + delta) is not None:
            self.row += delta
            self._show()

    def action_back(self) -> None:
        self.dismiss(None)
