"""Quantities and rough cost of the whole corridor: totals, then one row per segment.

The cost multiplies the quantities by the unit rates of presets/rates.toml, which ship as
invented placeholders; the screen says so whenever they are still marked placeholder.
"""

from __future__ import annotations

from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.screen import Screen
from textual.widgets import DataTable, Footer, Static

from screening.quantities import CorridorQuantities
from screening.tui.corridor_tools import money, rates_path, reinforcement_words
from screening.tui.widgets.segment_quantities import placeholder_note
from screening.tui.widgets.title_bar import CautionLine
from screening.units import Display


def totals_table(q: CorridorQuantities, display: Display) -> Table:
    """The corridor's totals: quantities on the left, rough cost by item on the right."""
    d = display
    amounts = [
        ("Wall length", d.format(q.total("length_along_m"), "m", 0)),
        ("Face (exposed)", d.format(q.total("face_area_m2"), "m2", 0)),
        ("Facing supplied", d.format(q.total("facing_area_m2"), "m2", 0)),
        ("Levelling pad", d.format(q.total("levelling_pad_m"), "m", 0)),
        ("Select fill", d.format(q.total("select_fill_m3"), "m3", 0)),
    ]
    for grade, area in sorted(q.geosynthetic_m2().items()):
        amounts.append((f"Geosynthetic {grade}", d.format(area, "m2", 0)))
    strips = int(q.total("strip_count"))
    if strips:
        amounts.append(
            ("Steel strips", f"{strips:,} strips, {d.format(q.total('strip_length_m'), 'm', 0)}")
        )
    if q.total("steel_kg"):
        amounts.append(("Steel (strips and mats)", d.format(q.total("steel_kg"), "kg", 0)))
    costs = [(item.capitalize(), money(v)) for item, v in q.cost().items() if v]
    costs.append(("Rough cost, total", money(q.total("cost_total"))))
    table = Table(box=None, header_style="bold", pad_edge=False, expand=True)
    table.add_column("Quantity", style="bold", no_wrap=True)
    table.add_column("Amount", justify="right", no_wrap=True)
    table.add_column("   ")
    table.add_column("Rough cost", style="bold", no_wrap=True)
    table.add_column(q.rates.currency or "cost", justify="right", no_wrap=True)
    for k in range(max(len(amounts), len(costs))):
        a = amounts[k] if k < len(amounts) else ("", "")
        c = costs[k] if k < len(costs) else ("", "")
        last = k == len(costs) - 1
        table.add_row(
            a[0],
            a[1],
            "",
            Text(c[0], style="bold" if last else ""),
            Text(c[1], style="bold reverse" if last else ""),
        )
    return table


COLUMNS = (
    ("id", "Id", 10),
    ("length", "Length", 10),
    ("face", "Face", 12),
    ("fill", "Select fill", 13),
    ("layers", "Layers", 6),
    ("reinforcement", "Reinforcement", 44),
    ("cost", "Rough cost", 12),
)


class QuantitiesScreen(Screen[None]):
    """Totals of the corridor and every segment's share."""

    BINDINGS = [Binding("escape,q,m", "back", "Back")]

    def __init__(
        self, name: str, quantities: CorridorQuantities, display: Display, row: int = 0
    ) -> None:
        super().__init__()
        self.corridor_name, self.q, self.display, self.row = name, quantities, display, row

    def compose(self) -> ComposeResult:
        n = len(self.q.segments)
        head = Text()
        head.append(" Quantities and rough cost ", style="bold reverse")
        head.append(
            f"  {self.corridor_name}  ·  {n} segments  ·  units {self.display.system.upper()}"
        )
        yield Static(head, id="quantities-heading")
        yield Static(totals_table(self.q, self.display), id="quantities-totals")
        note = placeholder_note(self.q.rates)
        note.append(f"\nrates from {rates_path()}", style="dim")
        short = sum(1 for s in self.q.segments if s.short_grade)
        if short:
            note.append(
                f"\n{short} segment(s) have a layer no grade passes: counted at the heaviest grade",
                style="yellow",
            )
        yield Static(note, id="quantities-note")
        yield DataTable(id="quantities-table", cursor_type="row", zebra_stripes=True)
        yield CautionLine(id="caution")
        yield Footer()

    def on_mount(self) -> None:
        d = self.display
        table = self.query_one(DataTable)
        units = {"length": d.label("m"), "face": d.label("m2"), "fill": d.label("m3")}
        for key, heading, width in COLUMNS:
            label = f"{heading} {units[key]}" if key in units else heading
            table.add_column(label, key=key, width=width)
        for i, s in enumerate(self.q.segments):
            table.add_row(
                Text(s.id, style="bold"),
                Text(f"{d.value(s.length_along_m, 'm'):,.1f}", justify="right"),
                Text(f"{d.value(s.face_area_m2, 'm2'):,.1f}", justify="right"),
                Text(f"{d.value(s.select_fill_m3, 'm3'):,.1f}", justify="right"),
                Text(str(s.layers), justify="right"),
                Text(reinforcement_words(s, d), style="yellow" if s.short_grade else ""),
                Text(money(s.cost_total), justify="right"),
                key=str(i),
            )
        if self.q.segments:
            table.move_cursor(row=min(self.row, len(self.q.segments) - 1), animate=False)
        table.focus()

    def action_back(self) -> None:
        self.dismiss(None)
