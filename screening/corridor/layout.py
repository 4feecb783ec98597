"""Overlaps and gaps between the segments of one wall, along the chainage.

Segments of one wall should follow each other: an overlap counts the shared length twice
(face area, fill, cost), a gap leaves a stretch of wall unscreened. A file with either still
loads (the interface opens it and marks the segments); ``wallscreen check`` refuses an
overlap and warns of a gap. :func:`find_layout_problems` sorts once (O(n log n)) and
compares every segment with the furthest-reaching one before it on its wall, so a long
segment that covers several short ones is caught too.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from screening.model import Corridor

OVERLAP_TOLERANCE_M = 1e-9
"""Segments that meet end to start within this are touching, not overlapping."""


def chainage_text(value_m: float) -> str:
    """A chainage in metres with at most three decimals and no trailing zeros."""
    out = f"{value_m:.3f}".rstrip("0").rstrip(".")
    return "0" if out == "-0" else out


@dataclass(frozen=True)
class LayoutProblem:
    """Two segments of one wall that overlap, or leave a gap between them."""

    kind: str
    """``"overlap"`` or ``"gap"``."""
    wall: str
    first_id: str
    """The segment that starts first (for an overlap: the one reaching furthest before)."""
    second_id: str
    """The segment that starts inside it (overlap) or after the gap."""
    from_m: float
    """Chainage where the shared stretch (or the gap) starts."""
    to_m: float
    """Chainage where it ends."""

    @property
    def length_m(self) -> float:
        return self.to_m - self.from_m

    def describe(self) -> str:
        """One plain sentence naming both segments and the chainages."""
        a, b = chainage_text(self.from_m), chainage_text(self.to_m)
        length = chainage_text(self.length_m)
        if self.kind == "overlap":
            return (
                f'Segments {self.first_id} and {self.second_id} of wall "{self.wall}" overlap '
                f"from chainage {a} m to {b} m ({length} m counted twice)."
            )
        return (
            f'Segments {self.first_id} and {self.second_id} of wall "{self.wall}" leave a gap '
            f"from chainage {a} m to {b} m ({length} m not screened)."
        )


def find_layout_problems(corridor: Corridor, *, min_gap_m: float = 0.01) -> list[LayoutProblem]:
    """Overlaps and gaps (longer than ``min_gap_m``) within each wall of ``corridor``.

    Walls in the order they first appear in the corridor, problems of a wall by chainage.
    """
    segs = corridor.segments
    n = len(segs)
    if n < 2:
        return []
    codes: dict[str, int] = {}
    wall = np.fromiter((codes.setdefault(s.wall, len(codes)) for s in segs), np.int64, n)
    start = np.fromiter((s.chainage_start_m for s in segs), np.float64, n)
    end = np.fromiter((s.chainage_end_m for s in segs), np.float64, n)
    order = np.lexsort((np.arange(n), end, start, wall))
    w, s, e = wall[order], start[order], end[order]
    # Running maximum of the end within each wall: rank the ends, offset by the wall, so a
    # cumulative maximum never carries from one wall into the next.
    end_rank = np.unique(e, return_inverse=True)[1].astype(np.int64)
    key = w * (n + 1) + end_rank
    reach = np.maximum.accumulate(key)
    pos = np.arange(n)
    owner = np.maximum.accumulate(np.where(key == reach, pos, 0))
    prev = owner[:-1]  # the furthest-reaching segment before each next one
    same = w[1:] == w[:-1]
    prev_end = e[prev]
    nxt_start, nxt_end = s[1:], e[1:]
    overlap = same & (nxt_start < prev_end - OVERLAP_TOLERANCE_M)
    gap = same & (nxt_start > prev_end + min_gap_m)
    hits = np.flatnonzero(overlap | gap)
    names = list(codes)
    out = []
    for k in hits.tolist():
        first, second = int(order[prev[k]]), int(order[k + 1])
        if overlap[k]:
            lo, hi = float(nxt_start[k]), float(min(prev_end[k], nxt_end[k]))
        else:
            lo, hi = float(prev_end[k]), float(nxt_start[k])
        out.append(
            LayoutProblem(
                kind="overlap" if overlap[k] else "gap",
                wall=names[int(w[k + 1])],
                first_id=segs[first].id,
                second_id=segs[second].id,
                from_m=lo,
                to_m=hi,
            )
        )
    return out
