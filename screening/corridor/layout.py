"""Overlaps and gaps between neighbouring segments of one wall.

Stand-in with the agreed names for the interface branch; the reliability work replaces it.
"""

from __future__ import annotations

from dataclasses import dataclass

from screening.model import Corridor


@dataclass(frozen=True)
class LayoutProblem:
    kind: str
    """``overlap`` or ``gap``."""
    wall: str
    first_id: str
    second_id: str
    from_m: float
    to_m: float

    def describe(self) -> str:
        what = "overlap" if self.kind == "overlap" else "gap"
        return (
            f"wall {self.wall!r}: {self.first_id} and {self.second_id} {what} "
            f"from {self.from_m:g} to {self.to_m:g} m"
        )


def find_layout_problems(corridor: Corridor, *, min_gap_m: float = 0.01) -> list[LayoutProblem]:
    """Overlaps and gaps wider than ``min_gap_m`` between consecutive segments of a wall."""
    by_wall: dict[str, list] = {}
    for seg in corridor.segments:
        by_wall.setdefault(seg.wall, []).append(seg)
    out: list[LayoutProblem] = []
    for wall, segs in by_wall.items():
        segs.sort(key=lambda s: (s.chainage_start_m, s.chainage_end_m))
        for a, b in zip(segs, segs[1:], strict=False):
            if b.chainage_start_m < a.chainage_end_m - 1e-9:
                to = min(a.chainage_end_m, b.chainage_end_m)
                out.append(LayoutProblem("overlap", wall, a.id, b.id, b.chainage_start_m, to))
            elif b.chainage_start_m - a.chainage_end_m > min_gap_m:
                out.append(
                    LayoutProblem("gap", wall, a.id, b.id, a.chainage_end_m, b.chainage_start_m)
                )
    return out
