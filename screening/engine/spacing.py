"""A closer spacing where no length and no grade passes (METHOD section 7, sizing).

When a segment still fails at the longest length screening tries with the heaviest grades,
and every check it fails is one that more layers help (compound, seismic, rupture, pullout:
each layer then carries less and the circles cut more of them), the screen is repeated on
those segments at a closer vertical spacing: 2/3 of the given spacing, then 1/2, never
below :data:`MIN_SPACING_M` [cp: the spacing of the facing's connections limits it in
practice, so a closer spacing makes the segment marginal at best]. Segments that pass at a
closer spacing take that result, with the change said in words; the others keep their
first result.
"""

from __future__ import annotations

import copy
from collections.abc import Callable
from dataclasses import replace

import numpy as np

from screening.engine.arrays import SegmentArrays
from screening.engine.combine import merge, take
from screening.engine.context import take_rows
from screening.engine.result import CorridorResult

CLOSER_SPACING_RATIOS = (2.0 / 3.0, 0.5)
"""Spacings tried, as fractions of the given one [cp]."""
MIN_SPACING_M = 0.2
"""No layer spacing closer than this [cp: about the least lift of compacted fill]."""
SPACING_HELPED = frozenset({"compound", "seismic", "rupture", "pullout"})


def _failing(result: CorridorResult) -> list[set[str]]:
    return [
        {name for name, c in result.checks.items() if c.cdr[i] < 1.0 - 1e-9}
        for i in range(len(result))
    ]


def candidates(result: CorridorResult) -> np.ndarray:
    """Referred segments inside the scope of screening whose failing checks all get help
    from more layers."""
    fails = _failing(result)
    return np.array(
        [
            i
            for i in range(len(result))
            if result.verdict[i] == "refer"
            and result.governing[i] in result.checks
            and fails[i]
            and fails[i] <= SPACING_HELPED
        ],
        dtype=np.int64,
    )


def closer_spacing(
    a: SegmentArrays,
    result: CorridorResult,
    screen_once: Callable[[SegmentArrays, list[str]], CorridorResult],
) -> CorridorResult:
    """``result`` with the segments that pass at a closer spacing replaced by that screen."""
    rows = candidates(result)
    for ratio in CLOSER_SPACING_RATIOS:
        if rows.size == 0:
            break
        old = a.spacing_m[rows]
        new = np.round(np.maximum(old * ratio, MIN_SPACING_M), 3)
        closer = new < old - 1e-9
        rows, old, new = rows[closer], old[closer], new[closer]
        if rows.size == 0:
            break
        # A copy of the case record: the slip-circle memo is keyed by it, and these rows
        # must not meet the results of their own ids at the first spacing.
        sub = replace(take_rows(a, rows, a.n), spacing_m=new, cases=copy.copy(a.cases))
        fails = _failing(result)
        words = [
            f"spacing {o:.2f} m -> {s:.2f} m, closer than the family's, for "
            f"{', '.join(sorted(fails[i]))}: check the facing's connection spacing"
            for o, s, i in zip(old.tolist(), new.tolist(), rows.tolist(), strict=True)
        ]
        again = screen_once(sub, words)
        passed = np.array([v != "refer" for v in again.verdict], dtype=bool)
        if passed.any():
            result = merge(result, rows[passed], take(again, np.flatnonzero(passed)))
        rows = rows[~passed]
    return result
