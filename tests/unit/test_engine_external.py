"""External checks against hand calculations of the textbook block model.

The formulas are the ones every MSE text gives for a rigid reinforced block (FHWA GEC 11
ch. 4 [from memory]; FHWA-NHI-00-043 ch. 4 [from memory]): V = gamma_r H L at L/2,
F1 = 0.5 Ka gamma_b H^2 at H/3, F2 = Ka q H at H/2, e = L/2 - (M_R - M_O)/V, Meyerhof
sigma_v = V/(L - 2e). Each expected value below is written out from those formulas, not
taken from the engine.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from screening.engine.arrays import build_arrays
from screening.engine.checks.external import bearing, eccentricity, sliding, water_factor
from screening.engine.context import build_context
from screening.engine.samples import ASD, LRFD, make_corridor, make_segment
from screening.model import Foundation, Soil

TOL = 1e-9


def _ctx(segments, fs=ASD):
    return build_context(build_arrays(make_corridor(segments, fs)))


def test_asd_level_wall_by_hand() -> None:
    # exposed 5.4 m on level ground -> H = 6.0 m (0.6 m embedment governs)
    seg = make_segment(0, height_start_m=5.4, height_end_m=5.4, surcharge_kpa=10.0, traffic=12.0)
    ctx = _ctx([seg])
    length = np.array([4.2])
    h, big_l, gr, gb = 6.0, 4.2, 20.0, 19.0
    ka = math.tan(math.radians(45 - 30 / 2)) ** 2
    f1 = 0.5 * ka * gb * h**2
    f_dead = ka * 10.0 * h
    f_live = ka * 12.0 * h
    v = gr * h * big_l + 10.0 * big_l  # live load left out of the resisting weight
    s = sliding(ctx, length)
    assert s.demand[0] == pytest.approx(f1 + f_dead + f_live, rel=TOL)
    tan_d = math.tan(math.radians(30.0))  # min(phi_r 34, phi_f 30)
    assert s.capacity[0] == pytest.approx(v * tan_d / 1.5, rel=TOL)
    m_o = f1 * h / 3 + (f_dead + f_live) * h / 2
    e_expected = m_o / v
    e = eccentricity(ctx, length)
    assert e.demand[0] == pytest.approx(e_expected, rel=TOL)
    assert e.capacity[0] == pytest.approx(big_l / 6, rel=TOL)
    assert e.cdr[0] == pytest.approx((big_l / 6) / e_expected, rel=TOL)
    # bearing: live load now on the block, vertical and in the moments
    v_b = v + 12.0 * big_l
    e_b = big_l / 2 - (v_b * big_l / 2 - m_o) / v_b
    sigma = v_b / (big_l - 2 * e_b)
    b = bearing(ctx, length)
    assert b.demand[0] == pytest.approx(sigma, rel=TOL)
    ngamma = 22.40248627  # Vesic, phi = 30 deg (AASHTO Table 10.6.3.1.2a-1: 22.40)
    q_n = 0.5 * 19.0 * (big_l - 2 * e_b) * ngamma * 1.0  # water 20 m down: C_w = 1
    assert b.capacity[0] == pytest.approx(0.4 * q_n, rel=1e-8)


def test_lrfd_roles_of_loads() -> None:
    """Strength I: sliding with EV 1.00 and ES 0.75 resisting, thrusts at 1.50/1.50/1.75;
    bearing with EV 1.35, ES 1.50 and LS 1.75 vertical [from memory, GEC 11 ch. 4]."""
    seg = make_segment(0, height_start_m=5.4, height_end_m=5.4, surcharge_kpa=10.0, traffic=12.0)
    ctx = _ctx([seg], LRFD)
    length = np.array([4.2])
    h, big_l = 6.0, 4.2
    ka = 1 / 3
    drive = 1.5 * 0.5 * ka * 19 * h**2 + 1.5 * ka * 10 * h + 1.75 * ka * 12 * h
    v_res = 1.0 * 20 * h * big_l + 0.75 * 10 * big_l
    s = sliding(ctx, length)
    assert s.demand[0] == pytest.approx(drive, rel=TOL)
    assert s.capacity[0] == pytest.approx(1.0 * v_res * math.tan(math.radians(30)), rel=TOL)
    v_b = 1.35 * 20 * h * big_l + 1.5 * 10 * big_l + 1.75 * 12 * big_l
    m_o = 1.5 * 0.5 * ka * 19 * h**2 * h / 3 + (1.5 * ka * 10 * h + 1.75 * ka * 12 * h) * h / 2
    e_b = m_o / v_b
    assert bearing(ctx, length).demand[0] == pytest.approx(v_b / (big_l - 2 * e_b), rel=TOL)


def test_undrained_base_takes_cu_times_length() -> None:
    found = Foundation(friction_deg=30.0, undrained_strength_kpa=30.0)
    ctx = _ctx([make_segment(0, foundation=found)])
    s = sliding(ctx, np.array([5.0]))
    assert s.capacity[0] == pytest.approx(30.0 * 5.0 / 1.5)
    assert s.detail[0].startswith("undrained")
    b = bearing(ctx, np.array([5.0]))
    assert b.capacity[0] == pytest.approx(0.4 * (2 + math.pi) * 30.0)


def test_backslope_adds_thrust_and_weight() -> None:
    """Coulomb thrust with delta = beta over h = H + L tan(beta), inclined at beta."""
    beta = 15.0
    ctx = _ctx([make_segment(0, backslope_deg=beta, height_start_m=5.4, height_end_m=5.4)])
    big_l, h = 5.0, 6.0
    hh = h + big_l * math.tan(math.radians(beta))
    b, p = math.radians(beta), math.radians(30.0)
    ka = (
        math.cos(b)
        * (math.cos(b) - math.sqrt(math.cos(b) ** 2 - math.cos(p) ** 2))
        / (math.cos(b) + math.sqrt(math.cos(b) ** 2 - math.cos(p) ** 2))
    )  # Rankine inclined = Coulomb with delta = beta on a vertical back
    thrust = 0.5 * ka * 19.0 * hh**2
    s = sliding(ctx, np.array([big_l]))
    assert s.demand[0] == pytest.approx(thrust * math.cos(b), rel=1e-9)
    v = 20 * h * big_l + 0.5 * 20 * big_l**2 * math.tan(b) + thrust * math.sin(b)
    assert s.capacity[0] == pytest.approx(v * math.tan(math.radians(30)) / 1.5, rel=1e-9)


def test_water_factor_limits() -> None:
    np.testing.assert_allclose(
        water_factor(np.array([0.0, 3.0, 6.0, 50.0]), np.array([4.0] * 4)), [0.5, 0.75, 1.0, 1.0]
    )


def test_weaker_retained_soil_lowers_every_external_cdr() -> None:
    strong = make_segment(0)
    weak = make_segment(1, retained=Soil(unit_weight_kn_m3=19.0, friction_deg=26.0))
    ctx = _ctx([strong, weak])
    length = np.array([4.7, 4.7])
    for check in (sliding, eccentricity, bearing):
        cdr = check(ctx, length).cdr
        assert cdr[1] < cdr[0]
