"""Where a new segment goes: fresh ids, the corridor's order, and a place along its wall
that never overlaps another segment of that wall.

No Textual here; :class:`screening.tui.session.Session` calls these for add, copy and
split, and for the first segment of an empty corridor.
"""

from __future__ import annotations

import dataclasses
import re
from dataclasses import dataclass

from screening.model import Corridor, Segment
from screening.model.errors import InputError
from screening.model.units import Display
from screening.profile.split import wall_code

MIN_ROOM_M = 0.1
"""A gap narrower than this is no room for a segment (the chainage step of the tool)."""
FIRST_LENGTH_M = 10.0
FIRST_HEIGHT_M = 3.0
"""The first segment of an empty corridor: 10 m long, 3 m exposed, to be edited at once."""


def fresh_id(base: str, taken: set[str]) -> str:
    """An id not in ``taken``, made from ``base``: ``E-04`` -> ``E-05`` if free, else
    ``E-04b``, ``E-04c`` ... (the trailing number keeps its width)."""
    match = re.fullmatch(r"(.*?)(\d+)", base)
    if match:
        stem, digits = match.groups()
        candidate = f"{stem}{int(digits) + 1:0{len(digits)}d}"
        if candidate not in taken:
            return candidate
    return lettered_id(base, taken)


def lettered_id(base: str, taken: set[str]) -> str:
    """``base`` with the first free letter b, c, ... appended (``base-N`` past z)."""
    for letter in "bcdefghijklmnopqrstuvwxyz":
        if f"{base}{letter}" not in taken:
            return f"{base}{letter}"
    n = 2
    while f"{base}-{n}" in taken:
        n += 1
    return f"{base}-{n}"


def chainage_order(segments: tuple[Segment, ...]) -> tuple[Segment, ...]:
    """Segments wall by wall (walls in order of their lowest chainage), each wall in
    chainage order; stable, so equal keys keep the file's order."""
    first: dict[str, float] = {}
    for s in segments:
        first[s.wall] = min(first.get(s.wall, s.chainage_start_m), s.chainage_start_m)
    rank = {w: k for k, w in enumerate(sorted(first, key=lambda w: (first[w], w)))}
    return tuple(
        sorted(segments, key=lambda s: (rank[s.wall], s.chainage_start_m, s.chainage_end_m))
    )


@dataclass(frozen=True)
class Place:
    """Where a new segment of a wall goes."""

    start_m: float
    end_m: float
    after: int
    """Index of the segment it follows in the corridor's list (it is inserted after it)."""
    height_m: float
    """Exposed height at its start: the end height of the segment it follows."""
    words: str
    """How it was placed, for the status line ("" when right after, full length)."""


def place_after(corridor: Corridor, row: int, length_m: float) -> Place:
    """A place for a segment of ``length_m`` in the wall of segment ``row``, as close after
    it as the wall allows: right after it when there is room; shortened to fill a gap
    shorter than ``length_m``; otherwise after the wall's last segment."""
    segs = corridor.segments
    base = segs[row]
    wall = [i for i, s in enumerate(segs) if s.wall == base.wall]
    later = [
        segs[i].chainage_start_m
        for i in wall
        if segs[i].chainage_start_m >= base.chainage_end_m - 1e-9 and i != row
    ]
    room = min(later) - base.chainage_end_m if later else float("inf")
    if room >= MIN_ROOM_M:
        length = min(length_m, room)
        words = ""
        if length < length_m - 1e-9:
            words = f"shortened to {length:g} m to fill the gap up to the next segment"
        return Place(
            base.chainage_end_m, base.chainage_end_m + length, row, base.height_end_m, words
        )
    last = max(wall, key=lambda i: (segs[i].chainage_end_m, i))
    end = segs[last].chainage_end_m
    return Place(
        end,
        end + length_m,
        last,
        segs[last].height_end_m,
        f"placed at the end of the wall, after {segs[last].id}: the chainage after "
        f"{base.id} is taken",
    )


def first_segment(corridor: Corridor) -> Segment:
    """The first segment of an empty corridor: its defaults, wall named after the corridor,
    chainage 0 to 10 m, 3 m exposed height; the user edits it at once."""
    d = corridor.defaults
    inherited = {  # every [defaults] key a segment carries (as a profile's segments get them)
        f.name: getattr(d, f.name) for f in dataclasses.fields(d) if f.name != "wall"
    }
    inherited["spacing_m"] = d.spacing_m if d.spacing_m is not None else d.reinforcement.spacing_m
    return Segment(
        id=f"{wall_code(corridor.name)}-01",
        wall=corridor.name,
        chainage_start_m=0.0,
        chainage_end_m=FIRST_LENGTH_M,
        height_start_m=FIRST_HEIGHT_M,
        height_end_m=FIRST_HEIGHT_M,
        **inherited,
    )


def split_chainage(seg: Segment, raw: str, units: Display) -> float:
    """The chainage (m) of ``raw``, typed in the display units, strictly inside ``seg``;
    InputError says what would do."""
    lo, hi = units.value(seg.chainage_start_m, "m"), units.value(seg.chainage_end_m, "m")
    try:
        typed = float(raw)
    except ValueError:
        typed = None
    if typed is None or not lo < typed < hi:
        what = f"{raw.strip()!r} is not a number" if typed is None else f"{typed:g} is outside"
        raise InputError(
            f"{what}: give a chainage between {lo:.6g} and {hi:.6g} {units.label('m')}",
            segment=seg.id,
            field="chainage",
        )
    if units.system == "si":
        return typed
    at = round(typed / units.value(1.0, "m"), 4)
    return min(max(at, seg.chainage_start_m + 1e-4), seg.chainage_end_m - 1e-4)


def split_segment(seg: Segment, at_m: float, taken: set[str]) -> tuple[Segment, Segment]:
    """``seg`` cut at ``at_m``; the exposed height at the cut is interpolated linearly."""
    t = (at_m - seg.chainage_start_m) / seg.length_along_m
    h_at = round(seg.height_start_m + t * (seg.height_end_m - seg.height_start_m), 3)
    first = dataclasses.replace(seg, chainage_end_m=at_m, height_end_m=h_at)
    second = dataclasses.replace(
        seg, id=lettered_id(seg.id, taken), chainage_start_m=at_m, height_start_m=h_at
    )
    return first, second
