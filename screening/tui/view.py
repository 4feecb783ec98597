"""Which rows the corridor table shows, and in what order: grouping by wall, folded walls,
filters (wall, verdict, text) and a sort by any column.

No Textual here. :class:`View` is a frozen set of choices; :meth:`View.rows` turns the
session's corridor and screen into the list of :class:`ViewRow` the table draws: a wall
line (``index`` None) before the segments of each wall when grouped, then the segments
that pass the filters, in chainage order within their wall or sorted by a column. The
segments themselves never move: a view only chooses and orders what is shown.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Callable
from dataclasses import dataclass

from screening.engine.result import CorridorResult
from screening.model import Corridor
from screening.report.labels import margin_of

__all__ = ["VERDICT_FILTERS", "View", "ViewRow", "margin_of", "walls_in_order"]

VERDICT_RANK = {"clear": 0, "marginal": 1, "refer": 2}

VERDICT_FILTERS: tuple[tuple[str, str, frozenset[str]], ...] = (
    ("all", "every verdict", frozenset()),
    ("refer", "refer only", frozenset({"refer"})),
    ("flagged", "refer and marginal", frozenset({"refer", "marginal"})),
    ("marginal", "marginal only", frozenset({"marginal"})),
    ("clear", "clear only", frozenset({"clear"})),
)
"""(key, words, verdicts kept) of the verdict filter; an empty set keeps every row."""


@dataclass(frozen=True)
class ViewRow:
    """One line of the table: a wall's summary line (``index`` None) or a segment."""

    wall: str
    index: int | None = None

    @property
    def is_wall(self) -> bool:
        return self.index is None


def _num(x: float | None) -> float:
    return float("inf") if x is None else float(x)


SortKey = Callable[[Corridor, CorridorResult | None, int], object]

SORT_KEYS: dict[str, SortKey] = {
    "id": lambda c, r, i: c.segments[i].id,
    "verdict": lambda c, r, i: VERDICT_RANK.get(r.verdict[i], -1) if r else -1,
    "cdr": lambda c, r, i: _num(margin_of(r, i)[1]) if r else float("inf"),
    "margin": lambda c, r, i: margin_of(r, i)[0] if r else "",
    "setby": lambda c, r, i: r.length_set_by[i] if r else "",
    "chainage": lambda c, r, i: (c.segments[i].chainage_start_m, c.segments[i].chainage_end_m),
    "exposed": lambda c, r, i: c.segments[i].exposed_height_m,
    "design": lambda c, r, i: float(r.design_height_m[i]) if r else 0.0,
    "length": lambda c, r, i: float(r.length_m[i]) if r else 0.0,
    "ratio": lambda c, r, i: float(r.length_ratio[i]) if r else 0.0,
    "fill": lambda c, r, i: getattr(c.segments[i].fill, "id", None) or "inline",
    "reinforcement": lambda c, r, i: getattr(c.segments[i].reinforcement, "id", None) or "inline",
    "traffic": lambda c, r, i: str(c.segments[i].traffic),
}
"""Column key -> the value a segment sorts by (``r`` is None before the first screen)."""


def walls_in_order(corridor: Corridor) -> list[str]:
    """Wall names in the order their first segment comes in the corridor."""
    return list(dict.fromkeys(s.wall for s in corridor.segments))


def search_text(corridor: Corridor, result: CorridorResult | None, i: int) -> str:
    """What the text filter looks in: id, wall, note, presets, and the screen's words."""
    s = corridor.segments[i]
    parts = [
        s.id,
        s.wall,
        s.note,
        s.structure,
        getattr(s.fill, "id", None) or "",
        getattr(s.reinforcement, "id", None) or "",
    ]
    if result is not None and i < len(result):
        parts += [result.verdict[i], result.governing[i], result.length_set_by[i]]
        parts += list(result.reasons[i])
    return " ".join(parts).lower()


@dataclass(frozen=True)
class View:
    """What the corridor table shows (defaults: every segment, grouped by wall)."""

    grouped: bool = True
    collapsed: frozenset[str] = frozenset()
    """Walls folded to their summary line."""
    wall: str | None = None
    """Only this wall (None: every wall)."""
    verdicts: frozenset[str] = frozenset()
    """Only these verdicts (empty: every verdict); rows not yet screened always show."""
    text: str = ""
    """Only segments whose id, wall, note, presets or reasons contain this (any case)."""
    sort: str | None = None
    """Column key to sort by within each wall (None: chainage order)."""
    descending: bool = False

    @property
    def filtered(self) -> bool:
        return self.wall is not None or bool(self.verdicts) or bool(self.text.strip())

    def replace(self, **changes: object) -> View:
        return dataclasses.replace(self, **changes)

    def keeps(self, corridor: Corridor, result: CorridorResult | None, i: int) -> bool:
        """True when segment ``i`` passes the filters."""
        seg = corridor.segments[i]
        if self.wall is not None and seg.wall != self.wall:
            return False
        if (
            self.verdicts
            and result is not None
            and i < len(result)
            and result.verdict[i] not in self.verdicts
        ):
            return False
        words = self.text.strip().lower()
        return not words or all(w in search_text(corridor, result, i) for w in words.split())

    def rows(self, corridor: Corridor, result: CorridorResult | None = None) -> list[ViewRow]:
        """The table's lines, top to bottom."""
        if result is not None and len(result) != len(corridor.segments):
            result = None
        kept = [i for i in range(len(corridor.segments)) if self.keeps(corridor, result, i)]
        if self.sort in SORT_KEYS:
            key = SORT_KEYS[self.sort]
            kept.sort(key=lambda i: key(corridor, result, i), reverse=self.descending)
        if not self.grouped:
            return [ViewRow(corridor.segments[i].wall, i) for i in kept]
        by_wall: dict[str, list[int]] = {w: [] for w in walls_in_order(corridor)}
        for i in kept:
            by_wall[corridor.segments[i].wall].append(i)
        out: list[ViewRow] = []
        for wall, members in by_wall.items():
            if not members:
                continue
            out.append(ViewRow(wall))
            if wall not in self.collapsed:
                out.extend(ViewRow(wall, i) for i in members)
        return out

    def words(self, headings: dict[str, str]) -> str:
        """The view in a few words for the status line (empty for the plain view)."""
        parts = []
        if self.wall is not None:
            parts.append(f"wall {self.wall}")
        if self.verdicts:
            parts.append(next(w for k, w, v in VERDICT_FILTERS if v == self.verdicts))
        if self.text.strip():
            parts.append(f"text “{self.text.strip()}”")
        if self.sort is not None:
            arrow = "↓" if self.descending else "↑"
            parts.append(f"sorted by {headings.get(self.sort, self.sort)} {arrow}")
        if not self.grouped:
            parts.append("not grouped")
        if self.collapsed:
            parts.append(f"{len(self.collapsed)} wall(s) folded")
        return " · ".join(parts)
