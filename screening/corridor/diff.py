"""Compare two versions of a corridor: what inputs changed, and how the outcome moved.

:func:`diff_corridors` matches segments by id. For each segment it lists the inputs that
differ (field paths such as ``fill.friction_deg``; a changed preset shows its id and every
value that differs) and, given both screens, how the verdict, the length L, the
governing check and the smallest capacity/demand ratio moved. Segments only in one
version are ``added`` or ``removed``. Corridor-level changes (factor set, rules, design
life, name) are on the returned list's ``corridor`` attribute. :func:`diff_text` and
:func:`diff_json` render it for people and for scripts.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass
from typing import Any, Literal

from screening.engine.result import CorridorResult
from screening.model import Corridor, Segment

Status = Literal["added", "removed", "changed", "same"]

SKIPPED = frozenset({"name", "note", "source"})
"""Descriptive text of presets: a changed label is not a changed input."""


@dataclass(frozen=True)
class FieldChange:
    """One input that differs: ``path`` like ``fill.friction_deg``."""

    path: str
    old: Any
    new: Any


@dataclass(frozen=True)
class Outcome:
    """What the screen said about one segment (None when not screened)."""

    verdict: str
    length_m: float
    governing: str
    min_cdr: float


@dataclass(frozen=True)
class SegmentDiff:
    id: str
    status: Status
    inputs: tuple[FieldChange, ...] = ()
    old: Outcome | None = None
    new: Outcome | None = None

    @property
    def outcome_moved(self) -> bool:
        if self.old is None or self.new is None:
            return False
        return (
            self.old.verdict != self.new.verdict
            or not math.isclose(self.old.length_m, self.new.length_m, abs_tol=1e-9)
            or self.old.governing != self.new.governing
            or not math.isclose(self.old.min_cdr, self.new.min_cdr, abs_tol=5e-3)
        )


class CorridorDiff(list[SegmentDiff]):
    """The per-segment differences (only segments that differ), plus corridor-level ones."""

    def __init__(self, items: list[SegmentDiff], corridor: tuple[FieldChange, ...], total: int):
        super().__init__(items)
        self.corridor = corridor
        """Changes outside the segments: name, factor set, rules, design life."""
        self.compared = total
        """Segments present in both versions."""


def _leaves(obj: Any, prefix: str) -> dict[str, Any]:
    """Dataclass fields flattened to ``a.b`` paths; tuples of dataclasses stay whole."""
    if dataclasses.is_dataclass(obj) and not isinstance(obj, type):
        out: dict[str, Any] = {}
        for f in dataclasses.fields(obj):
            if f.name in SKIPPED and prefix:
                continue
            out.update(_leaves(getattr(obj, f.name), f"{prefix}.{f.name}" if prefix else f.name))
        return out
    if isinstance(obj, dict):
        return {f"{prefix}.{k}": v for k, v in obj.items()}
    return {prefix: obj}


def field_changes(old: Any, new: Any, prefix: str = "") -> tuple[FieldChange, ...]:
    """Every leaf that differs between two objects of the same dataclass type."""
    a, b = _leaves(old, prefix), _leaves(new, prefix)
    out = []
    for path in [*a, *(p for p in b if p not in a)]:
        va, vb = a.get(path), b.get(path)
        if va != vb:
            out.append(FieldChange(path, va, vb))
    return tuple(out)


def _segment_inputs(old: Segment, new: Segment) -> tuple[FieldChange, ...]:
    return tuple(c for c in field_changes(old, new) if c.path != "id")


def _outcome(result: CorridorResult | None, index: dict[str, int], seg_id: str) -> Outcome | None:
    if result is None or seg_id not in index:
        return None
    i = index[seg_id]
    return Outcome(
        verdict=result.verdict[i],
        length_m=float(result.length_m[i]),
        governing=result.governing[i],
        min_cdr=float(result.min_cdr[i]),
    )


def diff_corridors(
    old: Corridor,
    new: Corridor,
    old_result: CorridorResult | None = None,
    new_result: CorridorResult | None = None,
    *,
    include_same: bool = False,
) -> CorridorDiff:
    """Differences between two corridors, in the new corridor's order, removed ones last.

    A segment is listed when its inputs changed or its outcome moved (a changed factor
    set moves outcomes without changing any segment); ``include_same`` lists every one.
    """
    old_by_id = {s.id: s for s in old.segments}
    new_ids = {s.id for s in new.segments}
    oi = {sid: i for i, sid in enumerate(old_result.ids)} if old_result is not None else {}
    ni = {sid: i for i, sid in enumerate(new_result.ids)} if new_result is not None else {}
    items: list[SegmentDiff] = []
    for seg in new.segments:
        before = old_by_id.get(seg.id)
        if before is None:
            items.append(SegmentDiff(seg.id, "added", new=_outcome(new_result, ni, seg.id)))
            continue
        d = SegmentDiff(
            seg.id,
            "changed",
            _segment_inputs(before, seg),
            _outcome(old_result, oi, seg.id),
            _outcome(new_result, ni, seg.id),
        )
        if not d.inputs and not d.outcome_moved:
            if not include_same:
                continue
            d = dataclasses.replace(d, status="same")
        items.append(d)
    for seg in old.segments:
        if seg.id not in new_ids:
            items.append(SegmentDiff(seg.id, "removed", old=_outcome(old_result, oi, seg.id)))
    corridor = (
        field_changes(old.factor_set, new.factor_set, "factor_set")
        if old.factor_set.id == new.factor_set.id
        else (FieldChange("factor_set", old.factor_set.id, new.factor_set.id),)
    )
    corridor += field_changes(old.rules, new.rules, "rules")
    for name in ("name", "design_life_years", "note"):
        if getattr(old, name) != getattr(new, name):
            corridor += (FieldChange(name, getattr(old, name), getattr(new, name)),)
    both = sum(1 for s in new.segments if s.id in old_by_id)
    return CorridorDiff(items, corridor, both)


# ------------------------------------------------------------------ rendering


def _show(value: Any) -> str:
    if isinstance(value, float):
        return f"{value:g}"
    if isinstance(value, tuple) and value and dataclasses.is_dataclass(value[0]):
        names = [getattr(v, "name", "") for v in value]
        return "(" + ", ".join(names) + ")"
    if value is None:
        return "none"
    return str(value)


def _moves(d: SegmentDiff) -> list[str]:
    o, n = d.old, d.new
    if o is None or n is None:
        return []
    out = []
    if o.verdict != n.verdict:
        out.append(f"verdict {o.verdict} -> {n.verdict}")
    if not math.isclose(o.length_m, n.length_m, abs_tol=1e-9):
        out.append(f"L {o.length_m:.1f} -> {n.length_m:.1f} m")
    if o.governing != n.governing:
        out.append(f"governing {o.governing} -> {n.governing}")
    if not math.isclose(o.min_cdr, n.min_cdr, abs_tol=5e-3):
        digits = 2 if f"{o.min_cdr:.2f}" != f"{n.min_cdr:.2f}" else 3
        out.append(f"min CDR {o.min_cdr:.{digits}f} -> {n.min_cdr:.{digits}f}")
    return out


def diff_text(diff: CorridorDiff) -> str:
    """A plain-text account of the differences, one block per segment."""
    lines: list[str] = []
    for c in diff.corridor:
        lines.append(f"corridor  {c.path}: {_show(c.old)} -> {_show(c.new)}")
    if diff.corridor:
        lines.append("")
    width = max((len(d.id) for d in diff), default=0)
    for d in diff:
        pad = " " * (width + 2)
        if d.status == "added":
            tail = f" ({d.new.verdict}, L {d.new.length_m:.1f} m)" if d.new else ""
            lines.append(f"{d.id:<{width}}  added{tail}")
            continue
        if d.status == "removed":
            tail = f" (was {d.old.verdict}, L {d.old.length_m:.1f} m)" if d.old else ""
            lines.append(f"{d.id:<{width}}  removed{tail}")
            continue
        inputs = "; ".join(f"{c.path} {_show(c.old)} -> {_show(c.new)}" for c in d.inputs)
        lines.append(f"{d.id:<{width}}  {inputs or 'inputs unchanged'}")
        moves = _moves(d)
        if moves:
            lines.append(pad + "; ".join(moves))
        elif d.old is not None and d.new is not None:
            lines.append(pad + f"outcome unchanged ({d.new.verdict}, L {d.new.length_m:.1f} m)")
    counts = {s: sum(1 for d in diff if d.status == s) for s in ("added", "removed", "changed")}
    flips = sum(1 for d in diff if d.old and d.new and d.old.verdict != d.new.verdict)
    if lines:
        lines.append("")
    lines.append(
        f"{counts['changed']} of {diff.compared} segments changed, {counts['added']} added, "
        f"{counts['removed']} removed; {flips} verdict(s) moved."
    )
    return "\n".join(lines)


def diff_json(diff: CorridorDiff) -> dict[str, Any]:
    """The differences as JSON-ready built-ins."""

    def plain(v: Any) -> Any:
        if isinstance(v, tuple) and v and dataclasses.is_dataclass(v[0]):
            return [dataclasses.asdict(x) for x in v]
        if dataclasses.is_dataclass(v) and not isinstance(v, type):
            return dataclasses.asdict(v)
        return v

    def change(c: FieldChange) -> dict[str, Any]:
        return {"field": c.path, "old": plain(c.old), "new": plain(c.new)}

    return {
        "corridor": [change(c) for c in diff.corridor],
        "segments": [
            {
                "id": d.id,
                "status": d.status,
                "inputs": [change(c) for c in d.inputs],
                "old": dataclasses.asdict(d.old) if d.old else None,
                "new": dataclasses.asdict(d.new) if d.new else None,
            }
            for d in diff
        ],
    }
