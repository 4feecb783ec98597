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

from screening.corridor.quantities import CorridorQuantities
from screening.model.units import Display
from screening.tui.corridor_tools import money, reinforcement_words
from screening.tui.widgets.segment_quantities import placeholder_note
from screening.tui.widgets.title_bar import CautionLine


def _pairs(title: str, unit_title: str, rows: list[tuple[str, str]], total: bool = False) -> Table:
    table = Table(box=None, header_style="bold", pad_edge=False)
    table.add_column(title, style="bold", no_wrap=True)
    table.add_column(unit_title, justify="right", no_wrap=True)
    for k, (name, value) in enumerate(rows):
        last = total and k == len(rows) - 1
        table.add_row(name, Text(value, style="bold reverse" if last else ""))
    return table


def amounts_table(q: CorridorQuantities, display: Display) -> Table:
    """The corridor's quantities (geosynthetics by grade, steel in strips and mass)."""
    d = display
    rows = [
        ("Wall length", d.format(q.total("length_along_m"), "m", 0)),
        ("Face (exposed)", d.format(q.total("face_area_m2"), "m2", 0)),
        ("Facing supplied", d.format(q.total("facing_area_m2"), "m2", 0)),
        ("Levelling pad", d.format(q.total("levelling_pad_m"), "m", 0)),
        ("Select fill", d.format(q.total("select_fill_m3"), "m3", 0)),
    ]
    strips = int(q.total("strip_count"))
    if strips:
        rows.append(
            ("Steel strips", f"{strips:,} strips, {d.format(q.total('strip_length_m'), 'm', 0)}")
        )
    if q.total("steel_kg"):
        rows.append(("Steel (strips and mats)", d.format(q.total("steel_kg"), "kg", 0)))
    return _pairs("Quantity", "Amount", rows)


def grades_table(q: CorridorQuantities, display: Display) -> Table | None:
    areas = q.geosynthetic_m2()
    if not areas:
        return None
    rows = [(grade, display.format(area, "m2", 0)) for grade, area in sorted(areas.items())]
    return _pairs("Geosynthetic", "Area", rows)


def cost_table(q: CorridorQuantities) -> Table:
    rows = [(item.capitalize(), money(v)) for item, v in q.cost().items() if v]
    rows.append(("Rough cost, total", money(q.total("cost_total"))))
    return _pairs("Rough cost", q.rates.currency or "cost", rows, total=True)


def totals_table(q: CorridorQuantities, display: Display) -> Table:
    """Quantities, geosynthetics by grade and rough cost by item, side by side."""
    parts = [amounts_table(q, display), grades_table(q, display), cost_table(q)]
    grid = Table.grid(padding=(0, 4))
    shown = [p for p in parts if p is not None]
    for _ in shown:
        grid.add_column(vertical="top")
    grid.add_row(*shown)
    return grid


COLUMNS = (
    ("id", "Id", 10),
    ("length", "Length", 10),
    ("face", "Face", 12),
    ("fill", "Select fill", 15),
    ("layers", "Layers", 6),
    ("reinforcement", "Reinforcement", 58),
    ("cost", "Rough cost", 12),
)


class QuantitiesScreen(Screen[None]):
    """Totals of the corridor and every segment's share."""

    DEFAULT_CSS = """
    QuantitiesScreen #quantities-heading { height: 1; }
    QuantitiesScreen #quantities-totals { height: auto; max-height: 16; padding: 1 1 0 1; }
    QuantitiesScreen #quantities-note { height: auto; padding: 0 1 1 1; }
    QuantitiesScreen #quantities-table { height: 1fr; }
    """

    BINDINGS = [Binding("escape,q,m", "back", "Back")]

    def __init__(
        self,
        name: str,
        quantities: CorridorQuantities,
        display: Display,
        row: int = 0,
        rates_source: str = "shipped rates (presets/rates.toml)",
    ) -> None:
        super().__init__()
        self.corridor_name, self.q, self.units, self.row = name, quantities, display, row
        self.rates_source = rates_source

    def compose(self) -> ComposeResult:
        n = len(self.q.segments)
        head = Text()
        head.append(" Quantities and rough cost ", style="bold reverse")
        head.append(
            f"  {self.corridor_name}  ·  {n} segments  ·  units {self.units.system.upper()}"
        )
        yield Static(head, id="quantities-heading")
        yield Static(totals_table(self.q, self.units), id="quantities-totals")
        note = placeholder_note(self.q.rates)
        note.append(f"\n{self.rates_source}; currency {self.q.rates.currency}", style="dim")
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
        d = self.units
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
