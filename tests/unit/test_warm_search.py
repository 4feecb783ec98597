"""Warm refinements (sizing's searches at a second length, started from the circles found at
the first) against a full search at that length.

A warm refinement replaced a full search in six of every eight searches of a screen; it must
find both families wherever the full search does and, where the factor decides a length or a
verdict (F 0.9-2.0, bench/bench_compound.py's DECIDING band), stop no higher than it within
the search's accuracy (common practice, no source: the fine search is the reference elsewhere,
bench/README "Accuracy", where the full search's global factor itself sits up to 3.7 % above
the fine one). Measured here: within 1 % except the global circle of the weak foundation with
a toe slope at +0.5H, 2.3 % above (hence 2.5 %). Above the band a refinement may stop higher:
6 % on the short wall's compound circle at F 2.6 and 2.5 % on the 6 m wall's global circle at
F 2.4, which move neither L nor the verdict.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from screening.engine.slip.check import compound_check
from tests.unit.test_compound import wall

WALLS = {
    "level-6m": {},
    "clay": {"found_undrained_kpa": np.array([30.0])},
    "toe-slope": {"toe_slope_deg": np.array([26.57])},
    "backslope": {"backslope_deg": np.array([18.4])},
    "weak-foundation": {"found_friction_deg": np.array([27.0]), "tangent": np.array([True])},
    "weak-foundation-toe-slope": {
        "found_friction_deg": np.array([28.0]),
        "toe_slope_deg": np.array([18.43]),
    },
    "short-wall": {"height_m": np.array([2.4]), "length_m": np.array([2.4])},
}


DECIDING = (0.9, 2.0)


def _search(inp, warm=None):
    return compound_check(inp, "asd", {"compound": 1.0}, warm=warm)


@pytest.mark.parametrize("changes", WALLS.values(), ids=WALLS.keys())
@pytest.mark.parametrize("longer", [0.2, 0.5])
def test_a_warm_refinement_finds_what_a_full_search_finds(changes, longer) -> None:
    first = dataclasses.replace(wall(), **changes)
    if first.height_m[0] < 3.0:  # the short wall's own layers
        first = dataclasses.replace(
            first, layer_level_m=first.layer_level_m[:, :4], layer_mask=first.layer_mask[:, :4],
            layer_rupture_kn_m=first.layer_rupture_kn_m[:, :4],
            layer_pullout_kn_m2=first.layer_pullout_kn_m2[:, :4],
        )  # fmt: skip
    known = _search(first)
    warm = np.stack([known.compound.params, known.global_.params], axis=1)  # (1, 2, 3)
    second = dataclasses.replace(first, length_m=first.length_m + longer * first.height_m)
    full, refined = _search(second), _search(second, warm)
    for family in ("compound", "global_"):
        want, got = getattr(full, family), getattr(refined, family)
        assert bool(got.found[0]) == bool(want.found[0]), family
        if want.found[0] and DECIDING[0] <= want.factor[0] <= DECIDING[1]:
            assert got.factor[0] <= want.factor[0] * 1.025, family
