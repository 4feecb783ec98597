"""Two versions of a corridor side by side: per segment, the inputs that changed and how
the verdict, L, governing check and smallest CDR moved (``screening.corridor.diff``).

The other file is taken as the older version and the open corridor (with its unsaved
edits) as the newer, so arrows read "other file -> what is open now".
"""

from __future__ import annotations

import math

from rich.console import Group
from rich.table import Table
from rich.text import Text
from textual.app import ComposeResult
from textual.binding import Binding
from textual.containers import VerticalScroll
from textual.screen import Screen
from textual.widgets import Footer, Static

from screening.corridor.diff import CorridorDiff, SegmentDiff
from screening.engine.result import cdr_text
from screening.model.units import Display
from screening.tui.cells import VERDICT_STYLE, verdict_text
from screening.tui.corridor_tools import show_value
from screening.tui.widgets.title_bar import CautionLine

STATUS_STYLE = {"added": "green", "removed": "red", "changed": "", "same": "dim"}


PRESET_PARTS = ("fill", "reinforcement", "retained", "foundation")
"""Inputs that are presets: one swapped for another reads as one line, not every value."""


def collapsed_changes(changes, display: Display) -> list[tuple[str, str, str]]:
    """(what, old, new) lines in the display units: a preset swapped for another (its id
    changed) is one line ``reinforcement geogrid → steel-strip``, not every value of it."""
    swapped = {
        c.path.split(".")[0]: c
        for c in changes
        if c.path.count(".") == 1
        and c.path.endswith(".id")
        and c.path.split(".")[0] in PRESET_PARTS
    }
    out = []
    for c in changes:
        head = c.path.split(".")[0]
        if head not in swapped:
            old, new = show_value(c.old, c.path, display), show_value(c.new, c.path, display)
            out.append((c.path, old, new))
        elif c is swapped[head]:
            out.append((head, str(c.old or "inline values"), str(c.new or "inline values")))
    return out


def _inputs(d: SegmentDiff, display: Display) -> Text:
    if not d.inputs:
        return Text("inputs unchanged", style="dim")
    out = Text()
    for k, (what, old, new) in enumerate(collapsed_changes(d.inputs, display)):
        if k:
            out.append("\n")
        out.append(f"{what} ", style="bold")
        out.append(f"{old} → {new}")
    return out


def _outcome(d: SegmentDiff, display: Display) -> Text:
    o, n = d.old, d.new
    out = Text()
    m = display.label("m")
    if d.status == "added" and n is not None:
        out.append_text(verdict_text(n.verdict))
        out.append(f", L {display.value(n.length_m, 'm'):.1f} {m}")
        return out
    if d.status == "removed" and o is not None:
        out.append("was ")
        out.append_text(verdict_text(o.verdict))
        out.append(f", L {display.value(o.length_m, 'm'):.1f} {m}")
        return out
    if o is None or n is None:
        return Text("not screened", style="dim")
    moved = False
    if o.verdict != n.verdict:
        out.append_text(verdict_text(o.verdict))
        out.append(" → ")
        out.append_text(verdict_text(n.verdict))
        moved = True
    if not math.isclose(o.length_m, n.length_m, abs_tol=1e-9):
        out.append(
            ("\n" if moved else "") + f"L {display.value(o.length_m, 'm'):.1f} → "
            f"{display.value(n.length_m, 'm'):.1f} {m}"
        )
        moved = True
    if o.governing != n.governing:
        out.append(("\n" if moved else "") + f"governs {o.governing} → {n.governing}")
        moved = True
    if not math.isclose(o.min_cdr, n.min_cdr, abs_tol=5e-3):
        style = "bold red" if n.min_cdr < 1.0 <= o.min_cdr else ""
        out.append(
            ("\n" if moved else "") + f"min CDR {cdr_text(o.min_cdr)} → {cdr_text(n.min_cdr)}",
            style,
        )
        moved = True
    if not moved:
        out.append("outcome unchanged (", style="dim")
        out.append(n.verdict, style=VERDICT_STYLE.get(n.verdict, ""))
        out.append(f", L {display.value(n.length_m, 'm'):.1f} {m})", style="dim")
    return out


def diff_table(diff: CorridorDiff, display: Display) -> Table:
    table = Table(box=None, header_style="bold", pad_edge=False, expand=True, show_lines=True)
    table.add_column("Segment", no_wrap=True)
    table.add_column("", no_wrap=True)
    table.add_column("Inputs: other file → open now", ratio=3)
    table.add_column("Outcome: other file → open now", ratio=2)
    for d in diff:
        table.add_row(
            Text(d.id, style="bold"),
            Text(d.status, style=STATUS_STYLE[d.status]),
            _inputs(d, display) if d.status == "changed" else Text(""),
            _outcome(d, display),
        )
    return table


def summary_line(diff: CorridorDiff) -> Text:
    counts = {s: sum(1 for d in diff if d.status == s) for s in ("added", "removed", "changed")}
    flips = sum(1 for d in diff if d.old and d.new and d.old.verdict != d.new.verdict)
    return Text(
        f"{counts['changed']} of {diff.compared} segments changed, {counts['added']} added, "
        f"{counts['removed']} removed; {flips} verdict(s) moved.",
        style="bold",
    )


def diff_view(diff: CorridorDiff, display: Display) -> Group:
    parts: list = []
    if diff.corridor:
        head = Text("Corridor\n", style="bold")
        for c in diff.corridor:
            head.append(
                f"  {c.path}: {show_value(c.old, c.path, display)} → "
                f"{show_value(c.new, c.path, display)}\n"
            )
        parts.append(head)
    if len(diff):
        parts.append(diff_table(diff, display))
    else:
        parts.append(Text("No segment differs in its inputs or its outcome.", style="dim"))
    parts += [Text(""), summary_line(diff)]
    return Group(*parts)


class CompareScreen(Screen[None]):
    """What moved between another corridor file and the open corridor."""

    BINDINGS = [Binding("escape,q,d", "back", "Back")]

    def __init__(self, other: str, this: str, diff: CorridorDiff, display: Display) -> None:
        super().__init__()
        self.other, self.this, self.diff, self.units = other, this, diff, display

    def compose(self) -> ComposeResult:
        head = Text()
        head.append(" Compare ", style="bold reverse")
        head.append(f"  {self.other}  →  {self.this}", style="bold")
        yield Static(head, id="compare-heading")
        with VerticalScroll(id="compare-body"):
            yield Static(diff_view(self.diff, self.units), id="compare-view")
        yield CautionLine(id="caution")
        yield Footer()

    def action_back(self) -> None:
        self.dismiss(None)
