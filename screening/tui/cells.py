"""How a segment and its screen read in the interface: table cells, verdict marks, summary.

A verdict always shows as a symbol *and* a word, so it reads the same without colour
(``NO_COLOR``) as with it. Cells are :class:`rich.text.Text`, never markup strings, so a
segment id like ``"[A]"`` cannot break the table.

Two heights, two names, as in ``wallscreen check``: *exposed* height (what the profile
gives, visible face) and design height *Hd* (exposed + embedment, what the checks use).
"""

from __future__ import annotations

from dataclasses import dataclass

from rich.text import Text

from screening.engine.result import CorridorResult, cdr_text
from screening.model import Corridor, Segment
from screening.model.units import Display
from screening.tui.view import margin_of

SI = Display("si")
"""Numbers as stored; ``Display("us")`` shows ft, psf, ... (files stay SI)."""

VERDICT_MARK = {"clear": "○", "marginal": "◑", "refer": "●"}
"""Hollow, half, full: the fuller the mark, the more the segment needs a designer."""
VERDICT_STYLE = {"clear": "green", "marginal": "yellow", "refer": "bold red"}
PENDING = "…"
PROBLEM_MARK = "⚠"
"""Before the id of a segment that overlaps or leaves a gap with its wall's next one."""
WALL_STYLE = "bold #7fa7b8"


@dataclass(frozen=True)
class Column:
    key: str
    heading: str
    width: int
    unit: str = ""
    """SI unit of the column's numbers (the heading names it in the display units)."""
    help: str = ""


COLUMNS: tuple[Column, ...] = (
    Column("id", "Id", 12, help="segment id; a wall's line shows its name"),
    Column("verdict", "Verdict", 10),
    Column("cdr", "CDR", 5, help="least margin: smallest CDR of the checks that did not set L"),
    Column("margin", "Least margin", 12, help="the check with that CDR (the failing one)"),
    Column("setby", "L set by", 16, help="what set L: a check or a rule"),
    Column("chainage", "Chainage", 13, "m"),
    Column("exposed", "Exposed", 10, "m", "exposed height at each end"),
    Column("design", "Hd", 5, "m", "design height: exposed + embedment"),
    Column("length", "L", 5, "m", "reinforcement length"),
    Column("ratio", "L/Hd", 4),
    Column("fill", "Fill", 19),
    Column("reinforcement", "Reinforcement", 13),
    Column("traffic", "Traffic", 9),
)
"""The corridor table, left to right; the first ``FROZEN`` stay put when it scrolls."""
FROZEN = 3
"""Id, Verdict and CDR never scroll out of sight, even at 80 columns."""
KEYS = tuple(c.key for c in COLUMNS)
BY_KEY = {c.key: c for c in COLUMNS}


def id_width(table_width: int) -> int:
    """Width of the Id column: room for a wall's name on wide screens, ids on narrow."""
    if table_width >= 150:
        return 26
    if table_width >= 110:
        return 22
    return 13


def column_heading(key: str, display: Display = SI) -> str:
    """``Chainage m`` or ``Chainage ft``: the heading in the display units."""
    col = BY_KEY[key]
    return f"{col.heading} {display.label(col.unit)}" if col.unit else col.heading


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


def input_cells(
    seg: Segment, display: Display = SI, *, problem: bool = False, indent: bool = False
) -> dict[str, Text]:
    """The cells that depend on the inputs only (lengths in the display units)."""
    m = display.value
    mark = PROBLEM_MARK if problem else ""
    lead = f"{mark or ' '} " if indent else mark
    ident = Text()
    ident.append(lead, style="bold yellow")
    ident.append(seg.id, style="bold")
    return {
        "id": ident,
        "chainage": Text(f"{m(seg.chainage_start_m, 'm'):.1f}–{m(seg.chainage_end_m, 'm'):.1f}"),
        "exposed": Text(f"{m(seg.height_start_m, 'm'):.1f}→{m(seg.height_end_m, 'm'):.1f}"),
        "fill": Text(preset_name(seg.fill)),
        "reinforcement": Text(preset_name(seg.reinforcement)),
        "traffic": Text(traffic_text(seg.traffic, display)),
    }


RESULT_KEYS = ("verdict", "cdr", "margin", "setby", "design", "length", "ratio")


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
        return {k: blank for k in RESULT_KEYS}
    check, cdr = margin_of(result, i)
    weak = cdr is not None and cdr < 1.0
    m = display.value
    cells = {
        "verdict": verdict_text(result.verdict[i]),
        "cdr": Text(
            "-" if cdr is None else cdr_text(cdr),
            justify="right",
            style="bold red" if weak else "",
        ),
        "margin": Text(check or "-", style="bold red" if weak else ""),
        "setby": Text(result.length_set_by[i]),
        "design": Text(f"{m(float(result.design_height_m[i]), 'm'):.1f}", justify="right"),
        "length": Text(f"{m(float(result.length_m[i]), 'm'):.1f}", justify="right"),
        "ratio": Text(f"{result.length_ratio[i]:.2f}", justify="right"),
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
    *,
    problem: bool = False,
    indent: bool = False,
) -> list[Text]:
    """A table row; a pending row with a ``quick`` (built-in checks) result shows that."""
    cells = input_cells(seg, display, problem=problem, indent=indent)
    if pending and quick is not None:
        cells |= result_cells(quick[0], quick[1], provisional=True, display=display)
    else:
        cells |= result_cells(result, i, pending, display=display)
    return [cells[key] for key in KEYS]


def short_name(name: str, width: int) -> str:
    """A wall's name in ``width`` characters, cut in the middle so its end (``, left``)
    stays: ``Hollin Road…, left``."""
    if len(name) <= width:
        return name
    head, sep, tail = name.rpartition(", ")
    tail = sep + tail if head and len(tail) < width // 2 else ""
    return name[: max(width - len(tail) - 1, 1)].rstrip() + "…" + tail


def _common(values: list[str]) -> str:
    return values[0] if len(set(values)) == 1 else "mixed"


def wall_cells(
    corridor: Corridor,
    result: CorridorResult | None,
    wall: str,
    members: list[int],
    *,
    folded: bool,
    stale: set[int] | frozenset[int] = frozenset(),
    display: Display = SI,
    shown: int | None = None,
    width: int = 40,
) -> list[Text]:
    """A wall's summary line: name, verdict counts, least margin, extent and tallest."""
    segs = [corridor.segments[i] for i in members]
    m, u = display.value, display.label("m")
    name = Text(("▸ " if folded else "▾ ") + short_name(wall, width - 2), style=WALL_STYLE)
    length = sum(s.length_along_m for s in segs)
    count = f"{len(segs)}" if shown is None or shown == len(segs) else f"{shown}/{len(segs)}"
    cells: dict[str, Text] = {
        "id": name,
        "setby": Text(f"{count} · {m(length, 'm'):,.0f} {u}", style="bold"),
        "chainage": Text(
            f"{m(min(s.chainage_start_m for s in segs), 'm'):.1f}–"
            f"{m(max(s.chainage_end_m for s in segs), 'm'):.1f}",
            style="bold",
        ),
        "exposed": Text(f"max {m(max(s.exposed_height_m for s in segs), 'm'):.1f}", style="bold"),
        "fill": Text(_common([preset_name(s.fill) for s in segs]), style="dim"),
        "reinforcement": Text(_common([preset_name(s.reinforcement) for s in segs]), style="dim"),
        "traffic": Text(_common([traffic_text(s.traffic, display) for s in segs]), style="dim"),
    }
    done = [i for i in members if i not in stale]
    if result is not None and len(result) == len(corridor.segments) and done:
        counts = Text()
        for verdict in ("refer", "marginal", "clear"):
            n = sum(result.verdict[i] == verdict for i in done)
            if n:
                counts.append(f"{VERDICT_MARK[verdict]}{n} ", style=VERDICT_STYLE[verdict])
        cells["verdict"] = counts
        margins = [(margin_of(result, i), i) for i in done]
        numbered = [(c, i) for c, i in margins if c[1] is not None]
        if numbered:
            (check, cdr), _ = min(numbered, key=lambda x: x[0][1])
            cells["cdr"] = Text(
                cdr_text(cdr), justify="right", style="bold red" if cdr < 1.0 else "bold"
            )
            cells["margin"] = Text(check, style="bold red" if cdr < 1.0 else "")
        cells["design"] = Text(
            f"{m(max(float(result.design_height_m[i]) for i in done), 'm'):.1f}",
            justify="right",
            style="bold",
        )
        cells["length"] = Text(
            f"{m(max(float(result.length_m[i]) for i in done), 'm'):.1f}",
            justify="right",
            style="bold",
        )
    blank = Text("")
    return [cells.get(key, blank) for key in KEYS]


def summary_text(
    corridor: Corridor,
    result: CorridorResult | None,
    stale: set[int] | frozenset[int] = frozenset(),
    display: Display = SI,
    problems: int = 0,
) -> Text:
    """Segments per verdict, total wall length and face area, factor set."""
    segs = corridor.segments
    length = sum(s.length_along_m for s in segs)
    area = sum(s.face_area_m2 for s in segs)
    out = Text()
    walls = len({s.wall for s in segs})
    out.append(f"{len(segs)} segment{'s' if len(segs) != 1 else ''}", style="bold")
    out.append(f" in {walls} wall{'s' if walls != 1 else ''}")
    if not segs:
        out.append("   nothing to screen yet", style="dim")
    elif result is not None and len(result) == len(segs):
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
    if problems:
        out.append(f"   {PROBLEM_MARK} {problems} layout problem(s) (!)", style="bold yellow")
    out.append(
        f"   wall {display.value(length, 'm'):,.0f} {display.label('m')}   "
        f"face {display.value(area, 'm2'):,.0f} {display.label('m2')}   "
    )
    out.append(f"factor set {corridor.factor_set.id}", style="bold")
    return out
