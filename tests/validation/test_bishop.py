"""Bishop's simplified method and the circle search against published slope results.

Sources, each named beside its check:
- ACADS slope-stability verification problems (Giam & Donald, 1989), problem 1(a): a simple
  homogeneous slope, referee factor of safety 1.00 [from memory: geometry and answer recalled,
  not re-read from the report].
- Taylor (1937; Fundamentals of Soil Mechanics, 1948) stability chart, phi = 0, vertical cut:
  stability number gamma*H*F/c = 3.83 for the critical toe circle [from memory; the same value
  is quoted in Craig's Soil Mechanics and Das' Principles of Geotechnical Engineering].
- Infinite slope in dry cohesionless soil: F = tan(phi)/tan(beta), the shallow limit of any
  circle (standard texts, e.g. Craig, Soil Mechanics, ch. 9).
- Bishop (1955): with phi = 0, m_alpha = cos(alpha) and Bishop's F equals the ordinary method
  of slices (Fellenius 1936) exactly.
- The Bishop fixed point checked with scipy.optimize.brentq (a general-purpose root finder).
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.optimize import brentq

from screening.engine.slip.bishop import SliceForces, bishop_factor, ordinary_factor
from screening.engine.slip.density import FINE
from screening.engine.slip.geometry import SlipLayers, SlipSection, SlipSoils
from screening.engine.slip.search import Bounds, search


def simple_slope(height_m, run_m, cohesion_kpa, friction_deg, unit_weight_kn_m3, water_m=-1e3):
    """Ground: level in front of the toe (x < 0), a straight slope to the crest, level behind.

    One segment; all three soils the same, no reinforced zone (L = 0).
    """
    gx = np.array([[-200.0, 0.0, run_m, run_m + 300.0]])
    gy = np.array([[0.0, 0.0, height_m, height_m]])
    section = SlipSection(
        gx, gy, np.array([height_m]), np.zeros(1), np.array([water_m]), np.zeros(1)
    )
    soils = SlipSoils(
        np.full((1, 3), unit_weight_kn_m3),
        np.full((1, 3), cohesion_kpa),
        np.full((1, 3), np.tan(np.radians(friction_deg))),
    )
    return section, soils


def grid(exits, entries, angles_deg):
    e, n, a = np.meshgrid(exits, entries, np.radians(angles_deg), indexing="ij")
    return np.stack([e.ravel(), n.ravel(), a.ravel()], -1)[None]


def critical(section, soils, grid_, bounds):
    found = search(section, soils, SlipLayers.none(1), grid_, bounds, FINE)
    return found.least


def test_acads_1a_simple_slope():
    """ACADS 1(a), Giam & Donald (1989) [from memory]: 10 m high 2H:1V slope, c' = 3 kPa,
    phi' = 19.6 deg, gamma = 20 kN/m3, dry; referee F = 1.00. Tolerance 3 % (published
    program results for this problem spread by about that much)."""
    section, soils = simple_slope(10.0, 20.0, 3.0, 19.6, 20.0)
    g = grid(np.linspace(-10.0, 10.0, 9), np.linspace(15.0, 45.0, 11), np.arange(10, 130, 10))
    bounds = Bounds(np.array([-30.0]), np.array([19.0]), np.array([1.0]), np.array([80.0]))
    circle = critical(section, soils, g, bounds)
    assert circle.converged[0]
    assert circle.factor[0] == pytest.approx(1.00, rel=0.03)
    # A toe circle: it leaves the ground at or just in front of the toe.
    assert -3.0 <= circle.x_exit_m[0] <= 1.0


def test_taylor_vertical_cut_phi_zero():
    """Taylor (1948) chart, phi = 0, beta = 90 deg [from memory]: gamma*H*F/c = 3.83, so
    F = 3.83 c / (gamma H). Tolerance 2 %."""
    h, c, gamma = 10.0, 50.0, 20.0
    section, soils = simple_slope(h, 1e-6, c, 0.0, gamma)
    g = grid(np.linspace(-10.0, 0.0, 6), np.linspace(1.0, 15.0, 11), np.arange(10, 130, 10))
    bounds = Bounds(np.array([-30.0]), np.array([0.0]), np.array([0.5]), np.array([40.0]))
    circle = critical(section, soils, g, bounds)
    assert circle.factor[0] == pytest.approx(3.83 * c / (gamma * h), rel=0.02)


@pytest.mark.parametrize(("friction_deg", "run_per_rise"), [(30.0, 2.0), (35.0, 1.5), (25.0, 3.0)])
def test_infinite_slope_limit(friction_deg, run_per_rise):
    """Dry sand slope: the critical circle is shallow and F tends to tan(phi)/tan(beta) from
    above (standard texts). Within 1 % above and never below it by more than 0.2 %."""
    h = 10.0
    section, soils = simple_slope(h, run_per_rise * h, 0.0, friction_deg, 19.0)
    run = run_per_rise * h
    g = grid(np.linspace(0.0, 0.8 * run, 6), np.linspace(0.2 * run, run, 6), np.arange(5, 60, 10))
    bounds = Bounds(np.array([-10.0]), np.array([run]), np.array([0.1]), np.array([run + 20.0]))
    circle = critical(section, soils, g, bounds)
    limit = np.tan(np.radians(friction_deg)) * run_per_rise
    assert limit * 0.998 <= circle.factor[0] <= limit * 1.01


slice_arrays = st.integers(min_value=3, max_value=30).flatmap(
    lambda s: st.tuples(
        st.lists(st.floats(5.0, 500.0), min_size=s, max_size=s),
        st.lists(st.floats(-0.6, 0.95), min_size=s, max_size=s),
        st.lists(st.floats(0.0, 80.0), min_size=s, max_size=s),
    )
)


def _forces(weights, sines, cohesion, friction_deg=0.0, pore=0.0):
    w = np.array(weights)
    sin_a = np.array(sines)
    return SliceForces(
        weight_kn=w,
        width_m=np.full(w.shape, 0.8),
        sin_a=sin_a,
        cos_a=np.sqrt(1.0 - sin_a**2),
        cohesion_kpa=np.array(cohesion),
        tan_phi=np.full(w.shape, np.tan(np.radians(friction_deg))),
        pore_kpa=np.full(w.shape, pore),
        radius_m=np.array(12.0),
    )


@settings(max_examples=60, deadline=None)
@given(slice_arrays)
def test_bishop_equals_fellenius_when_phi_is_zero(data):
    """Bishop (1955): phi = 0 makes m_alpha = cos(alpha), so Bishop's F is Fellenius' F."""
    weights, sines, cohesion = data
    f = _forces(weights, sines, cohesion)
    ordinary = ordinary_factor(f)
    if not np.isfinite(ordinary):  # the mass drives no rotation: both say so
        assert not np.isfinite(bishop_factor(f).value)
        return
    assert bishop_factor(f).value == pytest.approx(ordinary, rel=1e-9)


@pytest.mark.parametrize("friction_deg", [20.0, 30.0, 38.0])
def test_bishop_fixed_point_matches_brentq(friction_deg):
    """The iterated F solves Bishop's equation F = g(F) (Bishop 1955), checked against the
    root that scipy.optimize.brentq finds for F - g(F) on the same slices; |dF| < 1e-4."""
    sines = np.linspace(-0.3, 0.85, 12)
    weights = 60.0 + 200.0 * np.sin(np.linspace(0.2, 3.0, 12))
    f = _forces(weights, sines, np.full(12, 5.0), friction_deg, pore=10.0)
    got = bishop_factor(f)
    effective = np.clip(f.weight_kn - f.pore_kpa * f.width_m, 0, None)
    top = f.cohesion_kpa * f.width_m + effective * f.tan_phi
    drive = np.sum(f.weight_kn * f.sin_a)

    def residual(x):
        m_alpha = np.maximum(f.cos_a + f.sin_a * f.tan_phi / x, 0.2)
        return x - np.sum(top / m_alpha) / drive

    assert got.converged
    assert got.value == pytest.approx(brentq(residual, 0.05, 20.0), abs=2e-4)


def test_non_convergence_is_reported():
    """An iteration cut short says so (never a silent answer)."""
    f = _forces([100.0, 200.0, 150.0], [-0.2, 0.3, 0.7], [2.0, 2.0, 2.0], 35.0)
    assert not bishop_factor(f, max_iterations=1).converged
    assert bishop_factor(f).converged
