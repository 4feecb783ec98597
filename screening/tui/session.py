"""The corridor being worked on: inputs, their screen, the file, and undo/redo.

No Textual here: the screens call these methods and redraw what they report changed.
Every change keeps the previous ``(corridor, result, stale rows)`` on the undo stack, so
undo restores a screen without running the engine again. An edit of one segment marks
its row stale; the app re-screens stale rows off the UI thread (``screen_rows``) and hands
the numbers back through :meth:`Session.accept`. Changes that add, remove or reorder
segments, or switch the factor set, empty the result (``None``) for a whole new screen."""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from pathlib import Path

from screening import engine, store
from screening.corridor.layout import LayoutProblem, find_layout_problems
from screening.engine.result import CorridorResult
from screening.model import Corridor, Segment
from screening.model.errors import InputError
from screening.model.location import Where
from screening.model.units import Display
from screening.model.validate import check_corridor, check_segment
from screening.tui.fields import BY_NAME, parse_value, with_value
from screening.tui.placing import (
    chainage_order,
    first_segment,
    fresh_id,
    place_after,
    split_chainage,
    split_segment,
)

UNDO_DEPTH = 40


@dataclass(frozen=True)
class _State:
    corridor: Corridor
    result: CorridorResult | None
    stale: frozenset[int]
    label: str


@dataclass(frozen=True)
class Change:
    """What an operation changed, so the screen redraws only that."""

    label: str
    """Words for the status line, e.g. ``"E-04 height_end_m = 6.5"``."""
    rows: tuple[int, ...] | None
    """Rows whose inputs and results changed in place; None: the segment list changed."""
    cursor: int | None = None
    """Row to put the cursor on afterwards (None: leave it)."""


def screen_rows(corridor: Corridor, rows: list[int], **options: object) -> CorridorResult:
    """Screen only ``rows`` of ``corridor`` (a corridor of those segments, same settings);
    ``options`` go to ``engine.screen`` (``extra_checks=()``: the built-in checks only)."""
    sub = dataclasses.replace(corridor, segments=tuple(corridor.segments[i] for i in rows))
    return engine.screen(sub, **options)


class Session:
    """One open corridor."""

    def __init__(self, corridor: Corridor, path: Path | None, presets: object) -> None:
        corridor = dataclasses.replace(corridor, segments=chainage_order(corridor.segments))
        self.corridor = corridor
        """Inputs, in chainage order from the moment the file is opened."""
        self.result: CorridorResult | None = None
        """Last screen; None until the whole corridor has been screened (again)."""
        self.stale: set[int] = set()
        """Rows whose inputs changed after ``result`` was made: to re-screen."""
        self.quick: dict[int, tuple[Segment, CorridorResult, int]] = {}
        """Stale rows already screened by the built-in checks only (no slip circles), shown
        as provisional until the full screen of the row lands: row -> (segment, result, k)."""
        self.path = path
        """File it was read from and saves to; None for the unsaved demo copy."""
        self.presets = presets
        self.display = Display("si")
        """Units things are shown in (``us``: ft, psf, ...); the file and engine stay SI."""
        self.rates_override = None
        """Rates given with ``--rates FILE`` (they replace the corridor's own and shipped)."""
        self.rates_path: Path | None = None
        self._undo: list[_State] = []
        self._redo: list[_State] = []
        self._saved: Corridor | None = corridor
        self._coalesce: tuple[int, str] | None = None
        self._layout: tuple[tuple[Segment, ...], list[LayoutProblem]] | None = None

    # ------------------------------------------------------------------ state

    @property
    def dirty(self) -> bool:
        """True when the inputs differ from the file (always, for the unsaved demo copy)."""
        return self.corridor is not self._saved

    @property
    def can_undo(self) -> bool:
        return bool(self._undo)

    @property
    def can_redo(self) -> bool:
        return bool(self._redo)

    def _push(self, label: str) -> None:
        self._undo.append(_State(self.corridor, self.result, frozenset(self.stale), label))
        del self._undo[:-UNDO_DEPTH]
        self._redo.clear()

    def _set_segments(self, segments: list[Segment] | tuple[Segment, ...]) -> None:
        self.corridor = dataclasses.replace(self.corridor, segments=tuple(segments))

    def screen_all(self) -> CorridorResult:
        """Screen the whole corridor on this thread (scripts and the benchmark)."""
        self.result = engine.screen(self.corridor)
        self.stale.clear()
        return self.result

    def screen_stale(self) -> None:
        """Re-screen the stale rows on this thread (scripts and the benchmark)."""
        rows = sorted(self.stale)
        if rows and self.result is not None:
            self.accept(self.corridor, rows, screen_rows(self.corridor, rows))

    def accept(self, corridor: Corridor, rows: list[int] | range, result: CorridorResult) -> bool:
        """Take a screen of ``rows`` of ``corridor`` made elsewhere (a worker).

        Refused when the segment list or the factor set changed meanwhile (a new whole
        screen is then under way). Rows edited meanwhile take the new numbers but stay
        stale, so they are screened again.
        """
        now = self.corridor
        if (
            len(corridor.segments) != len(now.segments)
            or corridor.factor_set is not now.factor_set
            or corridor.rules is not now.rules
        ):
            return False
        rows = list(rows)
        if self.result is None:
            if rows != list(range(len(now.segments))):
                return False
            self.result = result
            self.stale = set()
        else:
            self.result = engine.merge(self.result, rows, result)
        fresh = {i for i in rows if corridor.segments[i] is now.segments[i]}
        self.stale = (self.stale - fresh) | (set(rows) - fresh)
        for i in fresh:
            self.quick.pop(i, None)
        return True

    def quick_screen(self, rows: list[int]) -> None:
        """The built-in checks only, on this thread (milliseconds a row), for ``rows``."""
        sub = screen_rows(self.corridor, rows, extra_checks=())
        for k, i in enumerate(rows):
            self.quick[i] = (self.corridor.segments[i], sub, k)

    def provisional(self, row: int) -> tuple[CorridorResult, int] | None:
        """The built-in checks' result of a stale row, if made for its current inputs."""
        entry = self.quick.get(row)
        if entry is None or row not in self.stale or entry[0] is not self.corridor.segments[row]:
            return None
        return entry[1], entry[2]

    def pending(self, row: int) -> bool:
        """True while ``row`` has no up-to-date result."""
        return self.result is None or row in self.stale

    def _rescreen(self, rows: tuple[int, ...]) -> None:
        """Mark ``rows`` for a re-screen (the app runs it off the UI thread)."""
        if self.result is not None:
            self.stale |= set(rows)

    # ------------------------------------------------------------------ edits

    def parse(self, field: str, raw: str, row: int = 0) -> object:
        """The value ``raw`` stands for in ``field`` (of segment ``row``, for soil values);
        InputError says why not."""
        return parse_value(self.corridor.segments[row], field, raw, self.presets, self.display)

    def _checked(self, segments: list[Segment], rows: list[int], field: str) -> None:
        """InputError unless the changed segments are consistent in themselves and, for a
        change of id, wall or chainage, with the rest of the corridor."""
        for i in rows:
            check_segment(segments[i], Where("", segment=segments[i].id))
        if field in ("id", "wall", "chainage_start_m", "chainage_end_m"):
            check_corridor(tuple(segments), [Where("", segment=s.id) for s in segments])

    def edit_field(self, row: int, field: str, raw: str) -> Change:
        """Set one input of one segment from what the user typed, and re-screen it.

        Successive edits of the same field of the same segment (typing ``6``, ``6.``,
        ``6.5``) make one undo step.
        """
        value = self.parse(field, raw, row)
        old = self.corridor.segments[row]
        segments = list(self.corridor.segments)
        segments[row] = new = with_value(old, field, value)
        self._checked(segments, [row], field)
        key = (row, field)
        if self._coalesce != key or not self._undo:
            self._push(f"{old.id} {field}")
        self._coalesce = key
        self._set_segments(segments)
        self._rescreen((row,))
        spec = BY_NAME.get(field)
        what = f"{spec.label} = {raw.strip()} {spec.unit}".rstrip() if spec else f"{field} = {raw}"
        return Change(f"{new.id}: {what}", (row,))

    def end_edit(self) -> None:
        """The editor closed: the next edit starts a new undo step."""
        self._coalesce = None

    def bulk_edit(self, rows: list[int], field: str, raw: str) -> Change:
        """Set ``field`` to one value on every row of ``rows`` (one undo step)."""
        value = self.parse(field, raw, rows[0])
        segments = list(self.corridor.segments)
        for i in rows:
            segments[i] = with_value(segments[i], field, value)
        self._checked(segments, rows, field)
        self._push(f"bulk {field}")
        self._coalesce = None
        self._set_segments(segments)
        self._rescreen(tuple(rows))
        return Change(f"{field} = {raw.strip()} on {len(rows)} segments", tuple(rows))

    # ------------------------------------------------------------------ corridor operations

    def _structural(self, label: str, segments: list[Segment], cursor: int) -> Change:
        self._push(label)
        self._coalesce = None
        self._set_segments(segments)
        self.result = None
        self.stale = set()
        self.quick.clear()
        return Change(label, None, cursor)

    def _taken(self) -> set[str]:
        return {s.id for s in self.corridor.segments}

    def add_after(self, row: int) -> Change:
        """A new segment after ``row``: same wall and inputs, continuing its chainage at
        its end height, 10 m long (or as long as the one before, if shorter). Never over
        another segment of the wall: a gap is filled, a taken chainage sends it to the
        wall's end. In an empty corridor: the first segment, from the defaults."""
        if not self.corridor.segments:
            new = first_segment(self.corridor)
            return self._structural(f"added {new.id}, the first segment", [new], 0)
        base = self.corridor.segments[row]
        place = place_after(self.corridor, row, min(10.0, base.length_along_m))
        new = dataclasses.replace(
            base,
            id=fresh_id(base.id, self._taken()),
            chainage_start_m=place.start_m,
            chainage_end_m=place.end_m,
            height_start_m=place.height_m,
            height_end_m=place.height_m,
            note="",
        )
        return self._insert(new, place.after, f"added {new.id}", place.words)

    def duplicate(self, row: int) -> Change:
        """A copy of ``row`` with a new id, placed after it along its wall (never over
        another segment: see :meth:`add_after`)."""
        base = self.corridor.segments[row]
        place = place_after(self.corridor, row, base.length_along_m)
        new = dataclasses.replace(
            base,
            id=fresh_id(base.id, self._taken()),
            chainage_start_m=place.start_m,
            chainage_end_m=place.end_m,
        )
        return self._insert(new, place.after, f"copied {base.id} to {new.id}", place.words)

    def _insert(self, new: Segment, after: int, label: str, words: str) -> Change:
        segments = list(self.corridor.segments)
        segments.insert(after + 1, new)
        a, b = (
            self.display.value(new.chainage_start_m, "m"),
            self.display.value(new.chainage_end_m, "m"),
        )
        where = f" at {a:.1f}–{b:.1f} {self.display.label('m')}"
        return self._structural(
            label + where + (f" ({words})" if words else ""), segments, after + 1
        )

    def split(self, row: int, raw_chainage: str) -> Change:
        """Cut ``row`` in two at a chainage strictly inside it (typed in the display
        units); heights are interpolated."""
        seg = self.corridor.segments[row]
        at = split_chainage(seg, raw_chainage, self.display)
        first, second = split_segment(seg, at, self._taken())
        segments = list(self.corridor.segments)
        segments[row : row + 1] = [first, second]
        where = f"{self.display.value(at, 'm'):g} {self.display.label('m')}"
        return self._structural(f"split {seg.id} at {where}", segments, row)

    def delete(self, rows: list[int]) -> Change:
        """Remove ``rows`` (every one of them, too: an empty corridor can be refilled)."""
        gone = set(rows)
        ids = [self.corridor.segments[i].id for i in sorted(gone)]
        segments = [s for i, s in enumerate(self.corridor.segments) if i not in gone]
        label = f"deleted {ids[0]}" if len(ids) == 1 else f"deleted {len(ids)} segments"
        return self._structural(label, segments, max(0, min(min(gone), len(segments) - 1)))

    def sort_by_chainage(self) -> Change:
        """Order the segments wall by wall, each wall in chainage order."""
        order = list(chainage_order(self.corridor.segments))
        return self._structural("put in chainage order, wall by wall", order, 0)

    # ------------------------------------------------------------------ layout

    def layout_problems(self) -> list[LayoutProblem]:
        """Overlaps and gaps between neighbours of one wall (worked out once per corridor)."""
        if self._layout is None or self._layout[0] is not self.corridor.segments:
            self._layout = (self.corridor.segments, find_layout_problems(self.corridor))
        return self._layout[1]

    def problem_ids(self) -> set[str]:
        """Ids of the segments on either side of an overlap or a gap."""
        return {i for p in self.layout_problems() for i in (p.first_id, p.second_id)}

    def set_factor_set(self, factor_set_id: str) -> Change:
        """Screen the whole corridor under another factor set (from the presets)."""
        factor_sets = self.presets.factor_sets
        if factor_set_id not in factor_sets:
            raise InputError(
                f"unknown factor set {factor_set_id!r}; choose one of {', '.join(sorted(factor_sets))}",
                field="factor_set",
                table="corridor",
            )
        self._push(f"factor set {self.corridor.factor_set.id}")
        self._coalesce = None
        self.corridor = dataclasses.replace(self.corridor, factor_set=factor_sets[factor_set_id])
        self.result = None
        self.stale = set()
        self.quick.clear()
        return Change(f"factor set {factor_set_id}", None)

    # ------------------------------------------------------------------ undo / files

    def undo(self) -> Change | None:
        if not self._undo:
            return None
        state = self._undo.pop()
        self._redo.append(_State(self.corridor, self.result, frozenset(self.stale), state.label))
        return self._restore(state, f"undid {state.label}")

    def redo(self) -> Change | None:
        if not self._redo:
            return None
        state = self._redo.pop()
        self._undo.append(_State(self.corridor, self.result, frozenset(self.stale), state.label))
        return self._restore(state, f"redid {state.label}")

    def _restore(self, state: _State, label: str) -> Change:
        self._coalesce = None
        same_rows = len(state.corridor.segments) == len(self.corridor.segments) and all(
            a.id == b.id
            for a, b in zip(state.corridor.segments, self.corridor.segments, strict=True)
        )
        rows = None
        if same_rows and state.corridor.factor_set is self.corridor.factor_set:
            rows = tuple(
                i
                for i, (a, b) in enumerate(
                    zip(state.corridor.segments, self.corridor.segments, strict=True)
                )
                if a is not b
            )
        self.corridor, self.result, self.stale = state.corridor, state.result, set(state.stale)
        self.quick.clear()
        return Change(label, rows)

    def save(self, path: Path | None = None) -> Path:
        """Write the corridor and its screen through the store (atomic, with a backup)."""
        target = Path(path) if path is not None else self.path
        if target is None:
            raise InputError("this corridor has no file yet: use save as and give a path")
        store.save(target, self.corridor, self.result)
        self.path = target
        self._saved = self.corridor
        return target
