"""Traffic (live) surcharge as an equivalent height of soil (METHOD section 2).

AASHTO LRFD 3.11.6.4 [from memory]: traffic perpendicular to an abutment approach takes an
equivalent soil height h_eq of 1.2 / 0.9 / 0.6 m for walls 1.5 / 3.0 / >= 6.0 m high, linear
between (1.2 m below 1.5 m); FHWA GEC 11 uses a uniform 0.6 m for traffic parallel to a wall.
The surcharge is q = gamma * h_eq with gamma the unit weight of the retained fill: the road sits
on the embankment behind and over the reinforced zone, and it is that soil the height stands for.
"""

from __future__ import annotations

import numpy as np

from screening.engine.arrays import (
    TRAFFIC_APPROACH,
    TRAFFIC_KPA,
    TRAFFIC_PARALLEL,
    SegmentArrays,
)
from screening.engine.result import FloatArray

APPROACH_HEIGHTS_M = (1.5, 3.0, 6.0)
APPROACH_HEQ_M = (1.2, 0.9, 0.6)
PARALLEL_HEQ_M = 0.6


def equivalent_height_m(traffic_class, height_m: FloatArray) -> FloatArray:
    """h_eq per segment for the class codes of arrays.py (0 for none and for a number in kPa)."""
    approach = np.interp(height_m, APPROACH_HEIGHTS_M, APPROACH_HEQ_M)
    heq = np.where(traffic_class == TRAFFIC_APPROACH, approach, 0.0)
    return np.where(traffic_class == TRAFFIC_PARALLEL, PARALLEL_HEQ_M, heq)


def traffic_kpa(a: SegmentArrays, height_m: FloatArray) -> FloatArray:
    """Unfactored live surcharge q_LL per segment, kPa."""
    heq = equivalent_height_m(a.traffic_class, height_m)
    q = heq * a.retained_unit_weight_kn_m3
    return np.where(a.traffic_class == TRAFFIC_KPA, a.traffic_value_kpa, q)
