"""Edit many segments at once: pick them (:func:`select_segments`: ids, a wall, a chainage
range, any test) and change fields of all of them (:func:`edit_segments`), returning a new
corridor.
"""

from __future__ import annotations

import dataclasses
import difflib
from collections.abc import Callable, Iterable
from typing import Any

from screening.model import Corridor, Segment
from screening.model.errors import InputError

EDITABLE = tuple(
    f.name
    for f in dataclasses.fields(Segment)
    if f.name not in ("id", "chainage_start_m", "chainage_end_m", "height_start_m", "height_end_m")
)
"""Segment fields a bulk edit may set (geometry and ids are edited one segment at a time)."""


def select_segments(
    corridor: Corridor,
    *,
    ids: Iterable[str] | None = None,
    wall: str | None = None,
    chainage_from_m: float | None = None,
    chainage_to_m: float | None = None,
    where: Callable[[Segment], bool] | None = None,
) -> list[int]:
    """Indices of the segments matching every given criterion.

    A chainage range picks segments that overlap it; ``where`` is any test on a segment.
    """
    wanted = set(ids) if ids is not None else None
    if wanted is not None:
        known = {s.id for s in corridor.segments}
        for missing in sorted(wanted - known):
            near = difflib.get_close_matches(missing, sorted(known), n=1)
            hint = f" (did you mean {near[0]!r}?)" if near else ""
            raise InputError(f"no segment with this id{hint}", segment=missing, field="id")
    picked = []
    for i, seg in enumerate(corridor.segments):
        if wanted is not None and seg.id not in wanted:
            continue
        if wall is not None and seg.wall != wall:
            continue
        if chainage_from_m is not None and seg.chainage_end_m <= chainage_from_m:
            continue
        if chainage_to_m is not None and seg.chainage_start_m >= chainage_to_m:
            continue
        if where is not None and not where(seg):
            continue
        picked.append(i)
    return picked


def edit_segments(corridor: Corridor, indices: Iterable[int], **changes: Any) -> Corridor:
    """A new corridor with ``changes`` (field=value) applied to the chosen segments.

    Field names are checked (with a "did you mean"); values are not: the store validates
    a corridor when it is saved or loaded, the same way as a hand-written file.
    """
    for key in changes:
        if key not in EDITABLE:
            near = difflib.get_close_matches(key, EDITABLE, n=1)
            hint = f" (did you mean {near[0]!r}?)" if near else ""
            raise InputError(
                f"cannot set {key!r} on many segments at once{hint}; settable: {', '.join(EDITABLE)}",
                field=key,
            )
    chosen = set(indices)
    segments = tuple(
        dataclasses.replace(seg, **changes) if i in chosen else seg
        for i, seg in enumerate(corridor.segments)
    )
    return dataclasses.replace(corridor, segments=segments)
