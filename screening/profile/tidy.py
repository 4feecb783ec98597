"""Tidy the pieces a profile was cut into: round the cuts, join pieces that are too short.

A profile cut at every 0.5 m of height change can leave cuts at 16.667 m and slivers of a
metre or so where a ramp steepens; nobody builds, draws or prices a wall like that. The
rounding keeps a cut on a point or break of the profile where it is; a joined piece never
hides a point higher than its ends, because a segment is screened at its taller end.
"""

from __future__ import annotations

import numpy as np

from screening.profile.split import Piece, ProfileLine


def _at(line: ProfileLine, x: float, side: int) -> float:
    """Height of the profile at chainage ``x``; at a step, the lower (``side`` -1) or the
    upper (+1) chainage's value."""
    ch, h = np.asarray(line.chainage_m), np.asarray(line.height_m)
    hits = np.flatnonzero(np.abs(ch - x) <= 1e-9)
    if hits.size:
        return float(h[hits[0] if side < 0 else hits[-1]])
    return float(np.interp(x, ch, h))


def tidy_pieces(
    pieces: list[Piece], line: ProfileLine, round_m: float, min_length_m: float
) -> tuple[list[Piece], list[str]]:
    """Cuts rounded to ``round_m`` (a cut on a point or a break of the profile stays), and
    pieces shorter than ``min_length_m`` joined to the neighbour they touch, where the
    join hides no point higher than the joined piece's ends (the engine screens a segment
    at its taller end, so that keeps the screen on the safe side). Returns the pieces and
    what could not be joined, in words."""
    fixed = {round(float(c), 6) for c in (*line.chainage_m, *line.breaks_m)}
    out: list[Piece] = []
    for c0, c1, h0, h1 in pieces:
        if out and round_m > 0 and abs(out[-1][1] - c0) <= 1e-9 and round(c0, 6) not in fixed:
            cut = round(round(c0 / round_m) * round_m, 6)
            if out[-1][0] < cut < c1:
                prev = out[-1]
                out[-1] = (prev[0], cut, prev[2], round(_at(line, cut, -1), 3))
                c0, h0 = cut, round(_at(line, cut, 1), 3)
        out.append((c0, c1, h0, h1))
    left: list[str] = []
    k = 0
    while k < len(out) and min_length_m > 0 and len(out) > 1:
        c0, c1, h0, h1 = out[k]
        if c1 - c0 >= min_length_m - 1e-9:
            k += 1
            continue
        options = []
        if k > 0 and abs(out[k - 1][1] - c0) <= 1e-9:
            a = out[k - 1]
            if max(a[3], h0) <= max(a[2], h1) + 1e-6:
                options.append((a[1] - a[0], k - 1, (a[0], c1, a[2], h1)))
        if k + 1 < len(out) and abs(out[k + 1][0] - c1) <= 1e-9:
            b = out[k + 1]
            if max(h1, b[2]) <= max(h0, b[3]) + 1e-6:
                options.append((b[1] - b[0], k, (c0, b[1], h0, b[3])))
        if not options:
            left.append(f"{c0:g}-{c1:g}")
            k += 1
            continue
        _, at, joined = min(options)  # into the shorter neighbour: segments stay even
        out[at : at + 2] = [joined]
        k = max(at - 1, 0)
    return out, left
