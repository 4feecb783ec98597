"""What ``check`` and ``report`` ask of a corridor beyond what loading it asks.

A file with no segments or with overlapping segments loads (the interface opens it, says
what to do and marks the overlaps), but a screen of it on the command line would mislead a
script: no segments is bad input (exit 2, there is nothing to screen, most likely the wrong
file), and so is an overlap (the shared stretch is counted twice in areas, fill and cost).
A gap within a wall is only a warning: walls do stop and start again.
"""

from __future__ import annotations

from pathlib import Path

from screening.corridor.layout import chainage_text, find_layout_problems
from screening.model import Corridor
from screening.model.errors import InputError, InputErrors

SHOWN = 5
"""Problems listed one a line; the rest are counted."""


def require_segments(path: Path, corridor: Corridor) -> None:
    if not corridor.segments:
        raise InputError(
            "no segments to screen: add a [[segment]] table (id, chainage_start_m, "
            "chainage_end_m, height_start_m, height_end_m), or build the corridor from a "
            "profile with `wallscreen new FILE --from-profile PROFILE`",
            file=str(path),
        )


def layout_warnings(path: Path, corridor: Corridor) -> list[str]:
    """Lines warning of gaps within a wall; InputErrors (exit 2) for any overlap."""
    problems = find_layout_problems(corridor)
    overlaps = [p for p in problems if p.kind == "overlap"]
    if overlaps:
        raise InputErrors(
            [
                InputError(
                    f'overlaps segment {p.first_id} of the same wall "{p.wall}" from '
                    f"{chainage_text(p.from_m)} m to {chainage_text(p.to_m)} m; segments of "
                    "one wall must not overlap (move or shorten one of them, or give one "
                    "another wall)",
                    file=str(path),
                    segment=p.second_id,
                    field="chainage_start_m",
                )
                for p in overlaps
            ],
            limit=SHOWN,
        )
    gaps = [p for p in problems if p.kind == "gap"]
    lines = [f"{path}: {p.describe()}" for p in gaps[:SHOWN]]
    if len(gaps) > SHOWN:
        lines.append(f"{path}: ... and {len(gaps) - SHOWN} more gaps ({len(gaps)} in all)")
    return lines
