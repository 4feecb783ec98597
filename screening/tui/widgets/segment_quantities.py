"""Quantities and rough cost of one segment, for its detail view."""

from __future__ import annotations

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual.widgets import Static

from screening.corridor.quantities import Rates, SegmentQuantities
from screening.model.units import Display
from screening.tui.corridor_tools import money, reinforcement_words


def placeholder_note(rates: Rates) -> Text:
    """Says plainly that the cost rests on invented rates until the user replaces them."""
    if rates.placeholder:
        return Text(
            "rough cost at PLACEHOLDER rates: put your own in a [rates] table of the corridor "
            "file (or --rates FILE) before showing a cost to anyone",
            style="italic yellow",
        )
    return Text(f"rough cost in {rates.currency or 'the rates file currency'}", style="dim")


def segment_quantities_table(q: SegmentQuantities, rates: Rates, display: Display) -> Table:
    table = Table(box=None, show_header=False, pad_edge=False, expand=True)
    table.add_column("what", style="bold", no_wrap=True)
    table.add_column("amount")
    table.add_row("Face (exposed)", display.format(q.face_area_m2, "m2"))
    table.add_row("Facing supplied", display.format(q.facing_area_m2, "m2"))
    table.add_row("Levelling pad", display.format(q.levelling_pad_m, "m"))
    table.add_row("Select fill", display.format(q.select_fill_m3, "m3"))
    reinf = reinforcement_words(q, display)
    if q.short_grade:
        reinf += "  (a layer has no grade that passes: counted at the heaviest)"
    table.add_row(f"Reinforcement ({q.layers} layers)", reinf)
    items = ", ".join(f"{k} {money(v)}" for k, v in q.cost.items() if v)
    table.add_row(f"Rough cost ({rates.currency})", Text(f"{money(q.cost_total)}  ({items})"))
    return table


class SegmentQuantitiesPanel(Static):
    """What the selected segment takes to build, roughly."""

    def show(self, q: SegmentQuantities | None, rates: Rates | None, display: Display) -> None:
        if q is None or rates is None:
            self.update(Text("quantities once this segment is screened", style="dim"))
            return
        title = Text("Quantities", style="bold")
        self.update(
            Group(title, segment_quantities_table(q, rates, display), placeholder_note(rates))
        )
