"""Internal stability (Simplified Method) against the published profiles and formulas.

- Kr/Ka [from memory, AASHTO LRFD Fig. 11.10.6.2.1-3; FHWA GEC 11 Fig. 4-10]: steel strips
  1.7 at the top to 1.2 at 6 m and below; steel grids 2.5 to 1.2; geosynthetics 1.0.
- F* [from memory, AASHTO LRFD Fig. 11.10.6.3.2-2; GEC 11 Fig. 4-12]: ribbed strips
  1.2 + log10(Cu) at the top (at most 2.0) to tan(phi_r) at 6 m; grids 20 t/St to 10 t/St;
  geosynthetics 0.67 tan(phi_r) without tests.
- Line of maximum tension [from memory, AASHTO LRFD Fig. 11.10.6.3.1-1]: inextensible
  0.3H above H/2 and 0.6(H - z) below; extensible Rankine plane 45 + phi/2 through the toe.
- Pullout P = F* alpha sigma_v' C Le Rc with C = 2 [from memory, AASHTO Eq. 11.10.6.3.2-1].
- Geosynthetic T_al = T_ult / (RF_ID RF_CR RF_D) [AASHTO LRFD 11.10.6.4.3].
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from screening.engine.arrays import GEOGRID, GRID, STRIP, build_arrays
from screening.engine.checks.internal import (
    active_length_m,
    choose_grades,
    grade_capacity_kn_m,
    kr_over_ka,
    prepare,
    pullout,
    pullout_friction,
    pullout_layers,
)
from screening.engine.context import build_context
from screening.engine.samples import ASD, LRFD, make_corridor, make_segment
from screening.engine.samples import GEOGRID as GEOGRID_FAMILY
from screening.engine.samples import GRID as GRID_FAMILY
from screening.model import Fill


@pytest.mark.parametrize(
    ("material", "z", "ratio"),
    [
        (STRIP, 0.0, 1.7), (STRIP, 3.0, 1.45), (STRIP, 6.0, 1.2), (STRIP, 9.0, 1.2),
        (GRID, 0.0, 2.5), (GRID, 3.0, 1.85), (GRID, 6.0, 1.2), (GRID, 12.0, 1.2),
        (GEOGRID, 0.0, 1.0), (GEOGRID, 7.0, 1.0),
    ],
)  # fmt: skip
def test_kr_over_ka_profile(material: int, z: float, ratio: float) -> None:
    assert float(kr_over_ka(np.array([material]), np.array([[z]]))[0, 0]) == pytest.approx(ratio)


def _arrays(**kw):
    return build_arrays(make_corridor([make_segment(0, **kw)], ASD))


def test_fstar_ribbed_strip() -> None:
    a = _arrays(fill=Fill(unit_weight_kn_m3=20.0, friction_deg=34.0, uniformity_coefficient=4.0))
    tan = np.array([[math.tan(math.radians(34.0))]])
    f = pullout_friction(a, tan, np.array([[0.0, 3.0, 6.0, 8.0]]))[0, 0]
    top = 1.2 + math.log10(4.0)
    np.testing.assert_allclose(f, [top, (top + tan[0, 0]) / 2, tan[0, 0], tan[0, 0]])


def test_fstar_strip_capped_at_two() -> None:
    a = _arrays(fill=Fill(unit_weight_kn_m3=20.0, friction_deg=34.0, uniformity_coefficient=50.0))
    f = pullout_friction(a, np.array([[math.tan(math.radians(34.0))]]), np.array([[0.0]]))
    assert float(f[0, 0, 0]) == pytest.approx(2.0)


def test_fstar_grid_and_geogrid() -> None:
    a = _arrays(reinforcement=GRID_FAMILY)
    t_st = 9.5 / 300.0
    f = pullout_friction(
        a, np.array([[math.tan(math.radians(34.0))]]), np.array([[0.0, 3.0, 6.0]])
    )[0, 0]
    np.testing.assert_allclose(f, [20 * t_st, 15 * t_st, 10 * t_st])
    g = _arrays(reinforcement=GEOGRID_FAMILY)
    tan = math.tan(math.radians(34.0))
    fg = pullout_friction(g, np.array([[tan]]), np.array([[0.0, 6.0]]))[0, 0]
    np.testing.assert_allclose(fg, [0.67 * tan, 0.67 * tan])


def test_line_of_maximum_tension() -> None:
    a = _arrays()
    h = np.array([10.0])
    z = np.array([[1.0, 5.0, 7.0, 10.0]])
    np.testing.assert_allclose(active_length_m(a, h, z)[0], [3.0, 3.0, 1.8, 0.0])
    g = _arrays(reinforcement=GEOGRID_FAMILY)
    np.testing.assert_allclose(
        active_length_m(g, h, z)[0], (10.0 - z[0]) * math.tan(math.radians(45 - 34.0 / 2))
    )


def test_geosynthetic_long_term_strength() -> None:
    a = _arrays(reinforcement=GEOGRID_FAMILY)
    cap, rc = grade_capacity_kn_m(a)
    rf = 1.2 * 1.6 * 1.15
    # ASD rupture factor 1/1.5 on T_al (FHWA-NHI-00-043: T_a = T_al / FS 1.5 [from memory])
    assert cap[0, 0] == pytest.approx(35.0 / rf / 1.5)
    assert rc[0, 0] == 1.0


def test_layer_tension_and_pullout_by_hand() -> None:
    """One strip layer written out: T = Kr sigma_v Sv, P = phi F* alpha sigma_v' 2 Le Rc."""
    seg = make_segment(0, height_start_m=5.4, height_end_m=5.4, traffic=10.0)  # H = 6.0 m
    a = build_arrays(make_corridor([seg], LRFD))
    ctx = build_context(a)
    s = prepare(ctx)
    z = ctx.geom.layer_depth_m[0]
    assert z[0] == pytest.approx(0.375) and len(z[ctx.geom.layer_mask[0]]) == 8
    j = 2  # third layer from the top, z = 1.875 m
    zj = z[j]
    ka = math.tan(math.radians(45 - 34 / 2)) ** 2
    kr = ka * (1.7 - 0.5 * zj / 6.0)
    sigma = 1.35 * 20.0 * zj + 1.75 * 10.0
    t = kr * sigma * 0.75
    assert s.tension[0, 0, j] == pytest.approx(t, rel=1e-12)
    length = 4.2
    la = 0.3 * 6.0
    fstar = 2.0 + (math.tan(math.radians(34)) - 2.0) * zj / 6.0  # Cu 10 -> 1.2 + 1 = 2.2 -> 2.0
    grades = choose_grades(ctx, s, np.array([length]))
    strips = float(grades.index[0, j] + 2)  # grades are 2..6 strips of 50 mm per metre
    rc = strips * 0.05
    p = 0.9 * fstar * 1.0 * (20.0 * zj) * 2 * (length - la) * rc
    cap, _ = pullout_layers(ctx, s, grades, np.array([length]))
    assert cap[0, 0, j] == pytest.approx(p, rel=1e-12)
    out = pullout(ctx, s, np.array([length]), grades)
    assert out.cdr[0] <= cap[0, 0, j] / t + 1e-12
    # the lightest grade: one strip fewer would fail pullout or rupture at this layer
    if strips > 2:
        p_less = p * (strips - 1) / strips
        rupture_less = 0.75 * 450.0 * (strips - 1) * 50.0 * (4.0 - 2 * 0.708) / 1000
        assert p_less < t or rupture_less < t


def test_partial_factor_on_tan_phi_divides_fstar() -> None:
    """EN 1997-1 M2 (gamma_phi' = 1.25 [from memory, Table A.4]) divides tan(phi) and so F*."""
    from screening.engine.samples import DA1

    a = build_arrays(make_corridor([make_segment(0)], DA1))
    ctx = build_context(a)
    z = np.array([[0.0, 3.0, 6.0]])
    f = pullout_friction(a, ctx.tan_fill, z)[0]
    np.testing.assert_allclose(f[1], f[0] / 1.25, rtol=1e-12)  # C2 against C1
    assert ctx.tan_fill[0, 1] == pytest.approx(math.tan(math.radians(34.0)) / 1.25)
