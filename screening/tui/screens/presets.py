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


def _rows_table(items: tuple[object, ...], title: str) -> Table:
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
            table.add_column(n.replace("_", " "), no_wrap=True)
        for it in items:
            table.add_row(*[_fmt(getattr(it, n)) for n in used])
        return table
    label = "name" if "name" in used else used[0]
    table.add_column("")
    for it in items:
        table.add_column(_fmt(getattr(it, label)))
    for n in used:
        if n != label:
            table.add_row(
                Text(n.replace("_", " "), style="bold"), *[_fmt(getattr(it, n)) for it in items]
            )
    return table


def preset_view(obj: object) -> Group:
    """Every value of a preset, its sub-tables, and its words (name, note, source)."""
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
            subs.append(_rows_table(value, f.name))
        else:
            table.add_row(f.name, _fmt(value))
    parts.append(table)
    for sub in subs:
        parts.extend([Text(""), sub])
    return Group(*parts)


class PresetsScreen(Screen[None]):
    BINDINGS = [Binding("escape,q,p", "back", "Back")]

    def __init__(self, presets: object) -> None:
        super().__init__()
        self.presets = presets
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
            self.query_one("#presets-view", Static).update(preset_view(obj))

    def action_back(self) -> None:
        self.dismiss(None)
