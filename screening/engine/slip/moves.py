"""The pattern search's moves on the (exit, entry, angle) lattice, and which candidate points
a start has already evaluated (so the search, numpy or compiled, skips them)."""

from __future__ import annotations

import numpy as np

_AXIS_MOVES = np.concatenate([np.eye(3), -np.eye(3)])
"""The 6 axis neighbours."""
_MOVES = np.array([m for m in np.ndindex(3, 3, 3) if m != (1, 1, 1)], dtype=np.float64) - 1.0
"""The 26 neighbours of a point on the (exit, entry, angle) lattice."""
_CORNER_MOVES = np.concatenate([_AXIS_MOVES, _MOVES[np.abs(_MOVES).sum(axis=1) == 3]])
"""The 6 axis neighbours and the 8 corners."""
MOVE_SETS = {26: _MOVES, 14: _CORNER_MOVES, 6: _AXIS_MOVES}
"""The pattern search's neighbourhoods by size (SearchDensity.moves)."""


_TABLES: dict[bytes, tuple[np.ndarray, np.ndarray]] = {}
"""move_tables by move set (three sets exist; every search asked for them anew)."""


def move_tables(moves: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """:func:`_move_tables`, computed once per move set (the arrays are read-only)."""
    key = np.ascontiguousarray(moves, dtype=np.float64).tobytes()
    if key not in _TABLES:
        overlap, index = _move_tables(moves)
        overlap.flags.writeable = index.flags.writeable = False
        _TABLES[key] = (overlap, index)
    return _TABLES[key]


def _move_tables(moves: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """For a set of pattern moves (M, 3): ``overlap`` (M, M), True where move j' from the
    point reached by move j0 lands on a point of j0's own neighbourhood (or its centre), and
    ``index`` (27,), the move with given components (ternary code), -1 for the centre or a
    move not in the set."""
    index = np.full(27, -1, dtype=np.int64)
    codes = ((moves + 1) @ np.array([9, 3, 1])).astype(np.int64)
    index[codes] = np.arange(moves.shape[0])
    total = moves[:, None, :] + moves[None, :, :]
    # A point of the old neighbourhood: the old centre, or one of the old moves (with 14 or
    # 6 moves not every step of one lattice cell is a move).
    inside = np.all(np.abs(total) <= 1, axis=-1)
    code = ((np.clip(total, -1, 1) + 1) @ np.array([9, 3, 1])).astype(np.int64)
    overlap = inside & ((index[code] >= 0) | np.all(total == 0, axis=-1))
    return overlap, index


def known_points(bp, cand, moves, index, last, unclipped):
    """(n, k, M) True where a candidate needs no evaluation, because this start has already
    evaluated that very point, whose factor is then no lower than the start's current one,
    so it can neither be accepted nor improve a family's best:

    - a move pushed back onto a bound lands where a shorter move (or the centre) does;
    - after an accepted move ``last`` (n, k; -1 none) that no bound changed (``unclipped``),
      the new neighbourhood shares its points with the previous one.
    """
    at = cand == bp[:, :, None, :]  # (n, k, M, 3): no move along that axis after clipping
    reduced = np.where(at, 0, moves[None, None].astype(np.int64))
    code = (reduced + 1) @ np.array([9, 3, 1])
    partner = index[code]  # (n, k, M)
    self_ = np.arange(moves.shape[0])[None, None, :]
    same_centre = np.all(at, axis=-1)
    other = np.take_along_axis(cand, np.maximum(partner, 0)[..., None], 2)
    dup = same_centre | ((partner >= 0) & (partner != self_) & np.all(other == cand, axis=-1))
    overlap, _ = move_tables(moves)
    seen = np.where((last >= 0)[..., None], overlap[np.maximum(last, 0)], False)
    return dup | (seen & unclipped[..., None])
