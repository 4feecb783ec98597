"""Traffic as an equivalent height of soil.

AASHTO LRFD 3.11.6.4, table of h_eq for abutments with traffic perpendicular [from memory]:
1.2 m at H = 1.5 m, 0.9 m at 3.0 m, 0.6 m at 6.0 m and above, linear between. Traffic
parallel to a wall: 0.6 m uniform as used in FHWA GEC 11 ch. 4 [from memory].
q = gamma * h_eq with gamma of the retained fill (our choice, stated in engine/loads.py).
"""

from __future__ import annotations

import numpy as np
import pytest

from screening.engine.arrays import TRAFFIC_APPROACH, TRAFFIC_NONE, TRAFFIC_PARALLEL, build_arrays
from screening.engine.geometry import build_geometry
from screening.engine.loads import equivalent_height_m, traffic_kpa
from screening.engine.samples import make_corridor, make_segment


@pytest.mark.parametrize(
    ("height", "heq"),
    [(1.0, 1.2), (1.5, 1.2), (2.25, 1.05), (3.0, 0.9), (4.5, 0.75), (6.0, 0.6), (12.0, 0.6)],
)
def test_approach_equivalent_height(height: float, heq: float) -> None:
    assert float(
        equivalent_height_m(np.array([TRAFFIC_APPROACH]), np.array([height]))[0]
    ) == pytest.approx(heq)


def test_parallel_and_none() -> None:
    h = np.array([2.0, 9.0])
    np.testing.assert_allclose(equivalent_height_m(np.full(2, TRAFFIC_PARALLEL), h), [0.6, 0.6])
    np.testing.assert_allclose(equivalent_height_m(np.full(2, TRAFFIC_NONE), h), [0.0, 0.0])


def test_surcharge_from_classes_and_numbers() -> None:
    segs = [
        make_segment(0, traffic="approach", height_start_m=2.4, height_end_m=2.4),  # H = 3.0 m
        make_segment(1, traffic="parallel"),
        make_segment(2, traffic=12.5),
        make_segment(3, traffic="none"),
    ]
    a = build_arrays(make_corridor(segs))
    q = traffic_kpa(a, build_geometry(a).design_height_m)
    gamma = segs[0].retained.unit_weight_kn_m3
    np.testing.assert_allclose(q, [0.9 * gamma, 0.6 * gamma, 12.5, 0.0])
