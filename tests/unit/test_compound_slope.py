"""Sloping ground: bearing beside a toe slope and the slope in the slip search.

Vesic (1975) ground-inclination factors [pub, Winterkorn & Fang, Foundation Engineering
Handbook ch. 3, as quoted in Das, Principles of Foundation Engineering; from memory]:
g_q = g_gamma = (1 - tan beta)^2; g_c = g_q - (1 - g_q)/(Nc tan phi); g_c = 1 - 2 beta/(pi + 2)
for phi = 0.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from screening import store
from screening.engine import screen
from screening.engine.arrays import build_arrays
from screening.engine.checks.external import bearing
from screening.engine.context import build_context
from screening.engine.slip.wall import toe_slope_bearing_factors

DENSE_SAND = "{ unit_weight_kn_m3 = 20.0, friction_deg = 38.0 }"


def corridor(foundation: str, height: float = 6.0):
    """One 6 m strip wall on ``foundation`` (invented test data)."""
    return store.loads(
        f"""
schema = "wallscreen/1"
[corridor]
name = "Toe slope test"
factor_set = "aashto-lrfd"
[defaults]
fill = "granular-wellgraded"
reinforcement = "steel-strip"
traffic = "none"
foundation = {foundation}
[[segment]]
id = "T-01"
wall = "Test wall"
chainage_start_m = 0.0
chainage_end_m = 20.0
height_start_m = {height}
height_end_m = {height}
""",
        "t.toml",
    )


@pytest.mark.parametrize(("slope_deg", "g_gamma"), [(0.0, 1.0), (18.435, 4 / 9), (26.565, 0.25)])
def test_vesic_ground_inclination_gamma(slope_deg, g_gamma):
    """Vesic (1975): 3H:1V gives (1 - 1/3)^2 = 4/9, 2H:1V gives (1 - 1/2)^2 = 1/4."""
    _, got, _ = toe_slope_bearing_factors(np.array([slope_deg]), np.array([32.0]))
    assert got[0] == pytest.approx(g_gamma, rel=1e-3)


def test_vesic_ground_inclination_cohesion():
    """Vesic (1975): phi = 0, beta = 2H:1V (0.4636 rad): g_c = 1 - 2(0.4636)/(pi + 2) = 0.820;
    phi = 30 deg: g_c = g_q - (1 - g_q)/(Nq - 1) with Nq = 18.40 (Vesic table)."""
    g_c0, _, g_cu = toe_slope_bearing_factors(np.array([26.565]), np.array([0.0]))
    assert g_c0[0] == pytest.approx(0.820, abs=1e-3)
    assert g_cu[0] == pytest.approx(0.820, abs=1e-3)
    g_c, g_q, _ = toe_slope_bearing_factors(np.array([26.565]), np.array([30.0]))
    assert g_c[0] == pytest.approx(0.25 - 0.75 / 17.40, abs=2e-3)


def test_toe_slope_lowers_bearing_and_overall_stability_in_a_screen():
    """Physical sense (common practice, no source): the same wall with a 2H:1V toe slope in
    front has a smaller bearing CDR at the same L, and a smaller global/compound CDR (the
    slope is in the slip search)."""
    level = corridor(DENSE_SAND)
    seg = dataclasses.replace(level.segments[0], toe_slope_deg=26.565, id="T-02")
    both = dataclasses.replace(level, segments=(level.segments[0], seg))
    core = screen(both, extra_checks=())
    # Same L for both rows, so the comparison is at one length.
    ctx = build_context(build_arrays(both))
    b = bearing(ctx, np.full(2, core.length_m.max()))
    assert b.cdr[1] < b.cdr[0]
    full = screen(both)
    slip = np.minimum(full.checks["compound"].cdr, full.checks["global"].cdr)
    assert slip[1] < slip[0]
