"""How a segment and its screen read in the interface: table cells, verdict marks, summary.

A verdict always shows as a symbol *and* a word, so it reads the same without colour
(``NO_COLOR``) as with it. Cells are :class:`rich.text.Text`, never markup strings, so a
segment id like ``"[A]"`` cannot break the table.
"""

from __future__ import annotations

from rich.text import Text

from screening.engine.result import CorridorResult, cdr_text
from screening.model import Corridor, Segment
from screening.model.units import Display

SI = Display("si")
"""Numbers as stored; ``Display("us")`` shows ft, psf, ... (files stay SI)."""

VERDICT_MARK = {"clear": "○", "marginal": "◑", "refer": "●"}
"""Hollow, half, full: the fuller the mark, the more the segment needs a designer."""
VERDICT_STYLE = {"clear": "green", "marginal": "yellow", "refer": "bold red"}
PENDING = "…"

COLUMNS: tuple[tuple[str, str, int], ...] = (
    ("id", "Id", 8),
    ("chainage", "Chainage m", 13),
    ("heights", "Height m", 10),
    ("length", "L m", 5),
    ("ratio", "L/H", 5),
    ("governing", "Governs", 15),
    ("cdr", "min CDR", 7),
    ("verdict", "Verdict", 11),
    ("fill", "Fill", 20),
    ("reinforcement", "Reinforcement", 15),
    ("traffic", "Traffic", 9),
)
"""(key, heading, width) of the corridor table, left to right."""

UNIT_COLUMNS = {"chainage": "Chainage", "heights": "Height", "length": "L"}
"""Columns whose heading names a length unit (shown in the display units)."""


def column_heading(key: str, heading: str, display: Display = SI) -> str:
    """``Chainage m`` or ``Chainage ft``: the heading in the display units."""
    return f"{UNIT_COLUMNS[key]} {display.label('m')}" if key in UNIT_COLUMNS else heading


def verdict_text(verdict: str) -> Text:
    """``● refer`` in the verdict's colour; unknown or pending shows an ellipsis."""
    if verdict not in VERDICT_MARK:
        return Text(PENDING, style="dim")
    return Text(f"{VERDICT_MARK[verdict]} {verdict}", style=VERDICT_STYLE[verdict])


def traffic_text(traffic: str | float, display: Display = SI) -> str:
    if isinstance(traffic, int | float):
        if display.system == "si":
            return f"{float(traffic):g} kPa"
        return display.format(float(traffic), "kPa", 0)
    return str(traffic)


def preset_name(obj: object) -> str:
    """A fill's or reinforcement's preset id, or ``inline`` for values given in the file."""
    return getattr(obj, "id", None) or "inline"


def input_cells(seg: Segment, display: Display = SI) -> dict[str, Text]:
    """The cells that depend on the inputs only (lengths in the display units)."""
    m = display.value
    return {
        "id": Text(seg.id, style="bold"),
        "chainage": Text(f"{m(seg.chainage_start_m, 'm'):.1f}–{m(seg.chainage_end_m, 'm'):.1f}"),
        "heights": Text(f"{m(seg.height_start_m, 'm'):.1f}→{m(seg.height_end_m, 'm'):.1f}"),
        "fill": Text(preset_name(seg.fill)),
        "reinforcement": Text(preset_name(seg.reinforcement)),
        "traffic": Text(traffic_text(seg.traffic, display)),
    }


def result_cells(
    result: CorridorResult | None,
    i: int,
    pending: bool = False,
    provisional: bool = False,
    display: Display = SI,
) -> dict[str, Text]:
    """The cells that come from the screen (ellipses while it is not yet known).

    ``provisional``: the built-in checks only, while the slip-circle checks still run:
    their numbers in italics, and no verdict yet ("… checking").
    """
    if result is None or pending:
        blank = Text(PENDING, style="dim")
        return {k: blank for k in ("length", "ratio", "governing", "cdr", "verdict")}
    cdr = float(result.min_cdr[i])
    verdict = result.verdict[i]
    weak = cdr < 1.0
    cells = {
        "length": Text(f"{display.value(float(result.length_m[i]), 'm'):.1f}", justify="right"),
        "ratio": Text(f"{result.length_ratio[i]:.2f}", justify="right"),
        "governing": Text(result.governing[i]),
        "cdr": Text(cdr_text(cdr), justify="right", style="bold red" if weak else ""),
        "verdict": verdict_text(verdict),
    }
    if provisional:
        for cell in cells.values():
            cell.stylize("italic")
        # no verdict until every check is in: the slip circles can still refer the segment
        cells["verdict"] = Text(f"{PENDING} checking", style="dim italic")
    return cells


def row_cells(
    seg: Segment,
    result: CorridorResult | None,
    i: int,
    pending: bool = False,
    quick: tuple[CorridorResult, int] | None = None,
    display: Display = SI,
) -> list[Text]:
    """A table row; a pending row with a ``quick`` (built-in checks) result shows that."""
    if pending and quick is not None:
        cells = input_cells(seg, display) | result_cells(
            quick[0], quick[1], provisional=True, display=display
        )
    else:
        cells = input_cells(seg, display) | result_cells(result, i, pending, display=display)
    return [cells[key] for key, _, _ in COLUMNS]


def summary_text(
    corridor: Corridor,
    result: CorridorResult | None,
    stale: set[int] | frozenset[int] = frozenset(),
    display: Display = SI,
) -> Text:
    """Segments per verdict, total wall length and face area, factor set."""
    segs = corridor.segments
    length = sum(s.length_along_m for s in segs)
    area = sum(s.face_area_m2 for s in segs)
    out = Text()
    out.append(f"{len(segs)} segments", style="bold")
    if result is not None and len(result) == len(segs):
        counts = {"clear": 0, "marginal": 0, "refer": 0}
        for i, verdict in enumerate(result.verdict):
            if i not in stale:
                counts[verdict] += 1
        for verdict, count in counts.items():
            out.append("   ")
            out.append(f"{VERDICT_MARK[verdict]} {verdict} {count}", style=VERDICT_STYLE[verdict])
        if stale:
            out.append(f"   {PENDING} {len(stale)} re-screening", style="dim")
    else:
        out.append(f"   {PENDING} screening", style="dim")
    out.append(
        f"   wall {display.value(length, 'm'):,.0f} {display.label('m')}   "
        f"face {display.value(area, 'm2'):,.0f} {display.label('m2')}   "
    )
    out.append(f"factor set {corridor.factor_set.id}", style="bold")
    return out
