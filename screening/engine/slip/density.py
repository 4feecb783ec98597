"""How many trial circles and slices the slip search tries (bench/bench_compound.py picks them).

:data:`STANDARD` is what screening uses; :data:`FINE` is the dense reference search of the
benchmark and the tests; :data:`WARM` refines circles already known (the same segment at
another length).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np


@dataclass(frozen=True)
class SearchDensity:
    """How many circles and slices the search tries (bench/bench_compound.py picks these)."""

    exit_fractions: tuple[float, ...]
    """x_exit = -f * (front reach), the reach being H plus the run of any toe slope."""
    entry_fractions_of_length: tuple[float, ...]
    """x_entry = f * L: circles entering over the reinforced zone."""
    entry_beyond_heights: tuple[float, ...]
    """x_entry = L + f * H: circles entering behind the reinforced zone."""
    angles_deg: tuple[float, ...]
    """Angles subtended by the arc at its centre."""
    slices: tuple[int, int, int] = (6, 12, 10)
    """Slices in front of the face, over the reinforced zone, behind it."""
    search_slices: tuple[int, int, int] = (4, 8, 6)
    """Slices while searching; the best circles are evaluated again with ``slices``."""
    refine_steps: int = 12
    moves: int = 26
    """Pattern-search neighbours: 26 (all), 14 (axes and corners) or 6 (axes)."""
    starts: int = 2
    """Best grid circles (any family, from different exit groups) the pattern search starts from."""
    family_starts: int = 2
    """Best grid circles of each family (from different exit groups) searched within it."""
    circles_per_chunk: int = 48
    """Circles evaluated together per segment (bounds memory: n x chunk x slices)."""


STANDARD = SearchDensity(
    exit_fractions=(0.0, 0.07, 0.17, 0.3, 0.5, 0.9, 1.3),
    entry_fractions_of_length=(0.3, 0.6, 0.9),
    entry_beyond_heights=(0.1, 0.3, 0.6, 1.0, 1.6, 2.4),
    angles_deg=(25.0, 45.0, 65.0, 85.0, 105.0, 125.0),
    slices=(6, 12, 10),
    search_slices=(6, 12, 10),
    refine_steps=10,
    moves=26,
    starts=3,
    family_starts=3,
    circles_per_chunk=16,
)
"""The density screening uses: within 1 % of a brute-force search over some 30,000 circles
per family (tests/validation/test_compound_practice.py) and of FINE on the benchmark corridor.
The grid reaches 1.3 x the front reach and L + 2.4H because global circles under a backslope
lie that far out; 26 neighbours because a family boundary blocks moves along one axis."""

FINE = SearchDensity(
    exit_fractions=tuple(float(v) for v in np.round(np.linspace(0.0, 1.5, 16), 3)),
    entry_fractions_of_length=tuple(float(v) for v in np.round(np.linspace(0.1, 0.99, 10), 3)),
    entry_beyond_heights=tuple(float(v) for v in np.round(np.geomspace(0.03, 3.2, 14), 3)),
    angles_deg=tuple(float(v) for v in np.linspace(8.0, 140.0, 16)),
    slices=(10, 24, 20),
    search_slices=(10, 24, 20),
    refine_steps=24,
    moves=26,
    starts=8,
    circles_per_chunk=16,
)
"""A dense search used only as the reference in the benchmark and tests."""

WARM = SearchDensity(
    exit_fractions=(0.0,),
    entry_fractions_of_length=(),
    entry_beyond_heights=(),
    angles_deg=(),
    slices=STANDARD.slices,
    search_slices=STANDARD.search_slices,
    refine_steps=8,
    moves=14,
    starts=3,
    circles_per_chunk=STANDARD.circles_per_chunk,
)
"""Refinement from known circles (the same segment at other lengths): its grid is the critical
circles found so far, each family's and every mode's, searched with small steps. Eight rounds,
not five: sizing decides at CDR = 1 where the compound CDR of a tall wall changes only ~2 % per
metre of L, so a refinement stopping 1-2 % high gave lengths up to 1 m short of the fine
search's (on 2,000 segments against a fine search at every length: 71 lengths shorter with
five rounds, 57 with eight, for +12 % screen time)."""

WARM_GRID = SearchDensity(
    exit_fractions=(0.0, 0.3),
    entry_fractions_of_length=(0.5, 0.9),
    entry_beyond_heights=(0.1, 0.5, 1.2),
    angles_deg=(35.0, 65.0, 95.0),
)
"""A few circles of every shape (30) a warm refinement starts from beside the known ones: a
known circle of another length or grade can lie in another basin than the critical circle
at this one, and a refinement from it alone then stops there (measured: up to 7 % above the
full search, so a length 0.5 m too short)."""
