"""Compound and global stability of wall segments: mechanics by hand and physical sense.

Sources beside each check; "common practice, no source" where it is a fact of the trade.
The walls are built directly as WallSlipInput arrays (no corridor file), so these tests run
the slip search itself; the screen-level tests at the bottom run the whole engine.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from screening.engine.slip.check import compound_check
from screening.engine.slip.density import FINE, STANDARD
from screening.engine.slip.geometry import Circles, SlipLayers, SlipSection, reinforcement_moment
from screening.engine.slip.wall import WallSlipInput

LRFD = {"compound": 0.65, "compound_abutment": 0.65}


def wall(n=1, height=6.0, length=4.2, rupture=120.0, **soil) -> WallSlipInput:
    """A 6 m wall of geogrid-like layers every 0.6 m on a foundation (values of our own)."""
    sv = 0.6
    m = int(height // sv)
    level = np.repeat((sv / 2 + sv * np.arange(m))[None, :], n, 0)
    depth = height - level
    pullout = 0.67 * np.tan(np.radians(34.0)) * 0.8 * 20.0 * depth * 2.0  # F* alpha sigma C
    full = lambda v: np.full(n, float(v))  # noqa: E731
    values = dict(
        height_m=full(height),
        embedment_m=full(0.6),
        length_m=full(length),
        backslope_deg=full(0.0),
        toe_slope_deg=full(0.0),
        toe_slope_height_m=full(height),
        fill_unit_weight_kn_m3=full(20.0),
        fill_cohesion_kpa=full(0.0),
        fill_friction_deg=full(34.0),
        retained_unit_weight_kn_m3=full(19.0),
        retained_cohesion_kpa=full(0.0),
        retained_friction_deg=full(30.0),
        found_unit_weight_kn_m3=full(19.0),
        found_cohesion_kpa=full(0.0),
        found_friction_deg=full(32.0),
        found_undrained_kpa=full(np.nan),
        found_water_depth_m=full(20.0),
        surcharge_kpa=full(0.0),
        live_kpa=full(0.0),
        abutment=np.zeros(n, dtype=bool),
        layer_level_m=level,
        layer_mask=np.ones((n, m), dtype=bool),
        layer_rupture_kn_m=np.full((n, m), rupture),
        layer_pullout_kn_m2=pullout,
    )
    values.update({k: full(v) if np.isscalar(v) else v for k, v in soil.items()})
    return WallSlipInput(**values)


def least_cdr(result) -> np.ndarray:
    return np.minimum(result.compound.cdr, result.global_.cdr)


def test_layer_force_is_the_least_of_rupture_and_the_two_pullouts():
    """METHOD section 6 [mem, FHWA GEC 11 vol. II ch. 9]: a cut layer adds T*D about the
    centre, T = min(rupture, pullout beyond, pullout in front + facing), D = y_c - y. Checked by
    hand for one layer and one circle."""
    section = SlipSection(
        np.array([[-50.0, 0.0, 0.0, 50.0]]),
        np.array([[0.0, 0.0, 6.0, 6.0]]),
        np.array([6.0]),
        np.array([4.0]),
        np.array([-np.inf]),
        np.zeros(1),
    )
    xc, yc, r = 0.0, 8.0, 7.0
    circles = Circles(
        *(np.array([[v]]) for v in (-6.0, 6.0, 0.0, 6.0, xc, yc, r)), np.array([[True]])
    )
    y = 2.0
    x_cut = xc + np.sqrt(r**2 - (y - yc) ** 2)  # 3.606 m: inside 0 < x < L
    beyond, front = 4.0 - x_cut, x_cut - 0.0
    for rupture, pullout, facing in ((500.0, 30.0, 0.0), (5.0, 30.0, 0.0), (500.0, 30.0, 500.0)):
        layers = SlipLayers(
            np.array([[y]]),
            np.array([[True]]),
            np.array([[rupture]]),
            np.array([[pullout]]),
            np.array([[facing]]),
        )
        expected = min(rupture, pullout * beyond, pullout * front + facing) * (yc - y)
        assert reinforcement_moment(section, layers, circles)[0, 0] == pytest.approx(expected)


def test_soft_clay_fails_global_and_dense_sand_passes():
    """Physical sense (common practice, no source): the same wall on soft clay (cu 15 kPa)
    fails overall stability through the foundation; on dense sand (phi' 38 deg) it passes."""
    clay = compound_check(wall(found_undrained_kpa=15.0, found_friction_deg=24.0), "lrfd", LRFD)
    sand = compound_check(wall(found_friction_deg=38.0), "lrfd", LRFD)
    assert least_cdr(clay)[0] < 1.0
    assert clay.global_.cdr[0] < 1.0  # the circle under the whole block fails
    assert "short term" in clay.global_.case[0]
    assert least_cdr(sand)[0] >= 1.0


def test_stronger_reinforcement_never_lowers_the_compound_cdr():
    """Physical sense (common practice, no source): stronger layers hold more."""
    cdr = [
        least_cdr(compound_check(wall(rupture=t), "lrfd", LRFD))[0]
        for t in (5.0, 20.0, 60.0, 200.0)
    ]
    assert all(b >= a - 1e-3 for a, b in zip(cdr, cdr[1:], strict=False))
    assert cdr[-1] > cdr[0]


def test_seismic_coefficient_never_raises_the_cdr():
    """Physical sense (common practice, no source): a pseudo-static kh only adds driving."""
    inp = wall()
    cdr = [
        least_cdr(compound_check(inp, "lrfd", LRFD, kh=np.array([k])))[0]
        for k in (0.0, 0.05, 0.1, 0.2)
    ]
    assert all(b <= a + 1e-3 for a, b in zip(cdr, cdr[1:], strict=False))
    assert cdr[-1] < cdr[0]


def test_water_table_at_the_base_lowers_the_cdr():
    """Effective stress (Terzaghi): pore pressure on the slip surface lowers F."""
    dry = least_cdr(compound_check(wall(), "lrfd", LRFD))[0]
    wet = least_cdr(compound_check(wall(found_water_depth_m=0.0), "lrfd", LRFD))[0]
    assert wet < dry


def test_toe_slope_weight_and_geometry_are_in_the_search():
    """A toe slope falling away in front lowers the global CDR (common practice, no source),
    and a 2H:1V toe slope in phi' = 32 deg sand cannot beat its own infinite-slope factor,
    tan(32)/0.5 = 1.25 (standard texts): the critical F is at most that."""
    level = compound_check(wall(), "lrfd", LRFD)
    sloped = compound_check(wall(toe_slope_deg=26.57), "lrfd", LRFD)
    assert least_cdr(sloped)[0] < least_cdr(level)[0]
    f = min(sloped.compound.factor[0], sloped.global_.factor[0])
    assert f <= np.tan(np.radians(32.0)) / 0.5 * 1.01


def test_asd_and_lrfd_scale_the_same_factor():
    """CDR = F*phi (LRFD 0.65) and F/FS (ASD 1.3): same circle, ratio 0.65*1.3 [METHOD 6]."""
    inp = wall()
    lrfd = compound_check(inp, "lrfd", LRFD)
    asd = compound_check(inp, "asd", {"compound": 1 / 1.3, "compound_abutment": 1 / 1.5})
    assert lrfd.compound.factor[0] == pytest.approx(asd.compound.factor[0])
    assert lrfd.compound.cdr[0] == pytest.approx(asd.compound.cdr[0] * 0.65 * 1.3)


def test_partial_factors_divide_the_strength():
    """EN 1997-1 DA1-C2 [mem, Table A.4]: tan(phi') / 1.25. On cohesionless soils F with
    factored strength is close to F / 1.25 (not exact: the critical circle moves)."""
    inp = wall(rupture=1e4)
    unfactored = compound_check(inp, "lrfd", {"compound": 1.0})
    c2 = dataclasses.make_dataclass(
        "Case", ["name", "ev", "es", "ls", "tan_phi", "cohesion", "undrained", "checks"]
    )
    case = c2("DA1-C2", 1.0, 1.0, 1.3, 1.25, 1.25, 1.4, ("compound",))
    factored = compound_check(inp, "partial-factor", {"compound": 1.0}, cases=[case])
    ratio = unfactored.compound.factor[0] / factored.compound.factor[0]
    assert 1.1 < ratio < 1.4
    assert factored.compound.case[0] == "DA1-C2"


def test_standard_search_is_within_one_percent_of_the_fine_search():
    """The search density screening uses (STANDARD) against the dense reference (FINE) on a
    few walls of different kinds: the governing factor within 1 % (bench/bench_compound.py
    shows the same on a larger invented corridor)."""
    base = wall(n=4)
    inp = dataclasses.replace(
        base,
        height_m=np.array([4.0, 6.0, 8.0, 6.0]),
        found_undrained_kpa=np.array([np.nan, 40.0, np.nan, np.nan]),
        toe_slope_deg=np.array([0.0, 0.0, 18.43, 0.0]),
        backslope_deg=np.array([0.0, 0.0, 0.0, 18.43]),
    )
    std = compound_check(inp, "lrfd", LRFD, density=STANDARD)
    fine = compound_check(inp, "lrfd", LRFD, density=FINE)
    got, ref = least_cdr(std), least_cdr(fine)
    assert np.all(got <= ref * 1.01)
    assert np.all(got >= ref * 0.99)
    assert std.compound.converged.all() and std.global_.converged.all()
