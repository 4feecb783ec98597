"""Browse the presets: fills, reinforcement families and factor sets, values and sources."""

from __future__ import annotations

import dataclasses

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual import on
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import Horizontal, VerticalScroll
from textual.screen import Screen
from textual.widgets import Footer, OptionList, Static
from textual.widgets.option_list import Option

from screening.model.units import Display
from screening.report.labels import field_label
from screening.tui.corridor_tools import field_unit

SI = Display("si")

GROUPS = (("fills", "Fills"), ("reinforcement", "Reinforcement"), ("factor_sets", "Factor sets"))
WORDS = ("name", "note", "source", "id")


def _fmt(value: object) -> str:
    if isinstance(value, float):
        return f"{value:.4g}"
    if value is None:
        return "–"
    if isinstance(value, dict):
        return ", ".join(f"{k} {_fmt(v)}" for k, v in value.items())
    if isinstance(value, tuple) and all(isinstance(v, str) for v in value):
        return ", ".join(value)
    return str(value)


def _rows_table(items: tuple[object, ...], title: str, display: Display = SI) -> Table:
    """A table of dataclasses (grades, load cases). Few fields: one row per item; many
    fields: one row per field and one column per item, so nothing gets squeezed."""
    names = [f.name for f in dataclasses.fields(items[0])]
    used = [n for n in names if any(getattr(it, n) not in (None, "") for it in items)]
    table = Table(
        title=title,
        title_justify="left",
        title_style="bold",
        box=None,
        header_style="bold",
        pad_edge=False,
    )
    if len(used) <= 6:
        for n in used:
            table.add_column(field_label(n, display), no_wrap=True)
        for it in items:
            table.add_row(*[shown_value(n, getattr(it, n), display) for n in used])
        return table
    label = "name" if "name" in used else used[0]
    table.add_column("")
    for it in items:
        table.add_column(_fmt(getattr(it, label)))
    for n in used:
        if n != label:
            table.add_row(
                Text(field_label(n, display), style="bold"),
                *[shown_value(n, getattr(it, n), display) for it in items],
            )
    return table


def resistance_words(obj: object) -> str:
    """A factor set's resistance as its users write it: ``FS 1.5`` under allowable stress
    (the file keeps 1/FS so that CDR >= 1 passes in every set), ``φ 0.65`` otherwise."""
    asd = getattr(obj, "method", "") == "asd"
    return ", ".join(
        f"{check} FS {1.0 / v:.3g}" if asd and v > 0 else f"{check} φ {v:.3g}"
        for check, v in obj.resistance.items()
    )


def shown_value(name: str, value: object, display: Display) -> str:
    """A preset's value in the display units when its name carries one."""
    unit = field_unit(name)
    if isinstance(value, float) and unit not in (None, "°"):
        return f"{display.value(value, unit):.4g}"
    return _fmt(value)


def preset_view(obj: object, display: Display = SI) -> Group:
    """Every value of a preset (labelled in words and the display units), its
    sub-tables, and its words (name, note, source)."""
    parts: list[object] = []
    words = Text()
    for key in ("name", "note", "source"):
        text = getattr(obj, key, "")
        if text:
            words.append(f"{key}: ", style="bold")
            words.append(f"{text}\n")
    parts.append(words)
    table = Table(box=None, show_header=False, pad_edge=False)
    table.add_column("field", style="bold", no_wrap=True)
    table.add_column("value")
    subs = []
    for f in dataclasses.fields(obj):
        value = getattr(obj, f.name)
        if f.name in WORDS:
            continue
        if isinstance(value, tuple) and value and dataclasses.is_dataclass(value[0]):
            subs.append(_rows_table(value, f.name, display))
        elif f.name == "resistance":
            table.add_row(field_label(f.name, display), resistance_words(obj))
        else:
            table.add_row(field_label(f.name, display), shown_value(f.name, value, display))
    parts.append(table)
    for sub in subs:
        parts.extend([Text(""), sub])
    return Group(*parts)


class PresetsScreen(Screen[None]):
    BINDINGS = [Binding("escape,q,p", "back", "Back")]

    def __init__(self, presets: object, display: Display = SI) -> None:
        super().__init__()
        self.presets = presets
        self.units = display
        self.lookup: dict[str, object] = {}

    def compose(self) -> ComposeResult:
        options: list[Option | None] = []
        for attr, title in GROUPS:
            options.append(Option(Text(title, style="bold"), disabled=True))
            for pid, obj in getattr(self.presets, attr).items():
                key = f"{attr}:{pid}"
                self.lookup[key] = obj
                options.append(Option(Text("  " + pid), id=key))
        yield Static(Text(" Presets ", style="bold reverse"), id="presets-title")
        with Horizontal(id="presets-body"):
            yield OptionList(*options, id="presets-list")
            with VerticalScroll(id="presets-view-box"):
                yield Static("", id="presets-view")
        yield Footer()

    def on_mount(self) -> None:
        listing = self.query_one(OptionList)
        listing.focus()
        listing.highlighted = 1

    @on(OptionList.OptionHighlighted)
    def _show(self, event: OptionList.OptionHighlighted) -> None:
        obj = self.lookup.get(event.option.id or "")
        if obj is not None:
            self.query_one("#presets-view", Static).update(preset_view(obj, self.units))

    def action_back(self) -> None:
        self.dismiss(None)
