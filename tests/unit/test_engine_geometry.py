"""Design height, embedment, rule length and layer layout (METHOD section 1).

Embedment ratios [from memory, AASHTO C11.10.2.2 / FHWA GEC 11 ch. 2]: H/20 level toe,
H/10 abutment or 3H:1V toe slope, H/7 2H:1V, H/5 1.5H:1V, never below 0.6 m. Rule length
max(0.7H, 2.4 m) [from memory, AASHTO 11.10.2.1]; 0.8H / 1.0H under 3H:1V / 2H:1V
backslopes [common practice, no source]. Layer layout: common practice, no source.
"""

from __future__ import annotations

import numpy as np
import pytest

from screening.engine.arrays import build_arrays
from screening.engine.geometry import (
    build_geometry,
    ceil_step,
    design_height,
    embedment_ratio,
    layer_layout,
)
from screening.engine.samples import make_corridor, make_segment


def test_embedment_ratio_table() -> None:
    toe = np.array([0.0, 0.0, 18.43, 26.57, 33.69, 10.0])
    abut = np.array([False, True, False, False, False, False])
    np.testing.assert_allclose(
        embedment_ratio(toe, abut), [1 / 20, 1 / 10, 1 / 10, 1 / 7, 1 / 5, 1 / 10]
    )


def test_design_height_solves_h_equals_exposed_plus_embedment() -> None:
    exposed = np.array([3.0, 11.4, 8.0, 5.0])
    k = np.array([1 / 20, 1 / 20, 1 / 7, 1 / 10])
    h, d = design_height(exposed, k, 0.6)
    np.testing.assert_allclose(h, exposed + d)
    np.testing.assert_allclose(d, np.maximum(0.6, k * h))
    # 3 m wall on level ground: 0.6 m governs; 11.4 m: d = H/20 -> H = 12.0 m
    assert d[0] == pytest.approx(0.6)
    assert h[1] == pytest.approx(12.0)
    assert h[2] == pytest.approx(8.0 * 7 / 6)


def test_ceil_step_keeps_values_on_the_grid() -> None:
    np.testing.assert_allclose(
        ceil_step(np.array([4.2, 4.2000001, 4.21, 0.7 * 6.0]), 0.1), [4.2, 4.3, 4.3, 4.2]
    )


def test_layers_half_spacing_from_pad_and_top() -> None:
    count, depth, mask = layer_layout(np.array([6.0, 3.2, 0.5]), np.array([0.75, 0.6, 0.75]))
    assert count.tolist() == [8, 5, 1]
    z6 = depth[0, mask[0]]
    np.testing.assert_allclose(z6, 0.375 + 0.75 * np.arange(8))
    z3 = depth[1, mask[1]]
    assert z3[-1] == pytest.approx(3.2 - 0.3)  # bottom layer Sv/2 above the pad
    assert z3[0] >= 0.3 - 1e-12  # none closer than Sv/2 to the top
    np.testing.assert_allclose(np.diff(z3), 0.6)


def test_rule_length_and_search_limit() -> None:
    segs = [
        make_segment(0, height_start_m=5.7, height_end_m=5.7),  # H = 6.3 (0.6 governs)
        make_segment(1, height_start_m=1.0, height_end_m=1.0),  # H = 1.6 -> 2.4 m minimum
        make_segment(2, backslope_deg=18.43),
        make_segment(3, backslope_deg=26.57),
    ]
    g = build_geometry(build_arrays(make_corridor(segs)))
    np.testing.assert_allclose(g.design_height_m, [6.3, 1.6, 6.6, 6.6])
    np.testing.assert_allclose(g.rule_length_m, [4.5, 2.4, 5.3, 6.6])
    np.testing.assert_allclose(g.max_length_m, [7.5, 2.4, 7.9, 7.9])  # never beyond 1.2H
