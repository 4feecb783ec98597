"""Mononobe-Okabe and the seismic forces of an MSE wall against outside references.

- kh = 0 reduces M-O to Coulomb: Ka = 0.333 (phi 30, delta 0, level) and 0.297 (phi 30,
  delta 20, vertical back, level) as in published Coulomb tables [from memory, e.g. Das,
  Principles of Foundation Engineering, table of Coulomb Ka].
- M-O is the maximum over trial planes of the pseudo-static Coulomb wedge (Okabe 1926;
  Kramer 1996, Geotechnical Earthquake Engineering, 11.6): checked against a trial-wedge
  thrust maximised with scipy.optimize.minimize_scalar, a general-purpose optimiser.
- No solution when phi - psi - beta < 0 (the same references).
- Seed & Whitman (1970): the seismic increment of K_AE is roughly 3/4 kh for level backfill
  [from memory]; checked loosely (within 25 %) as an order-of-magnitude guard.
- Internal inertia shared in proportion to resistant length [mem, AASHTO LRFD 11.10.7.2].
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

from screening.engine.checks.seismic import (
    active_zone_area_m2,
    mononobe_okabe_kae,
    mononobe_okabe_valid,
    share_by_resistant_length,
    wall_kh,
)


@pytest.mark.parametrize(
    ("phi", "delta", "expected"),
    [(30.0, 0.0, 0.333), (30.0, 20.0, 0.297), (35.0, 0.0, 0.271)],
)
def test_static_limit_is_coulomb(phi, delta, expected):
    """kh = 0: published Coulomb Ka (module docstring; Rankine tan^2(45 - 35/2) = 0.271)."""
    assert mononobe_okabe_kae(phi, delta, 0.0, 0.0) == pytest.approx(expected, abs=0.0015)


def wedge_kae(phi_deg, delta_deg, beta_deg, kh):
    """K_AE as the largest thrust on a vertical wall over trial planes through its heel.

    Wedge of unit height and unit weight behind a vertical back, ground rising at beta; a
    plane at angle a from the horizontal. Forces on the wedge: weight W down, kh W towards the
    wall, the wall's reaction P inclined delta below the normal (the wedge moves down), the
    soil's reaction R at phi from the normal of the plane. Equilibrium gives P(a); the active
    thrust is its maximum (Coulomb's principle).
    """
    phi, delta, beta = np.radians([phi_deg, delta_deg, beta_deg])

    def thrust(a):
        # Wedge area for H = 1: triangle between the wall, the ground and the plane.
        area = 0.5 * np.cos(beta) * np.cos(a) / np.sin(a - beta)
        w = area
        # Unknowns P, R; unit vectors (x away from the wall into the backfill, y up).
        p_dir = np.array([np.cos(delta), np.sin(delta)])  # wall pushes away and up on wedge
        r_dir = np.array([-np.sin(a - phi), np.cos(a - phi)])  # plane reaction, rotated by phi
        load = np.array([kh * w, w])  # W down and kh W towards the wall, moved to the right side
        p, _ = np.linalg.solve(np.column_stack([p_dir, r_dir]), load)
        return p

    lo = np.radians(beta_deg) + 1e-3
    best = minimize_scalar(
        lambda a: -thrust(a),
        bounds=(lo, np.radians(89.9)),
        method="bounded",
        options={"xatol": 1e-10},
    )
    return 2.0 * thrust(best.x)


@pytest.mark.parametrize(
    ("phi", "delta", "beta", "kh"),
    [
        (30.0, 0.0, 0.0, 0.1),
        (35.0, 17.5, 0.0, 0.2),
        (34.0, 15.0, 10.0, 0.15),
        (40.0, 20.0, 18.4, 0.25),
    ],
)
def test_mononobe_okabe_is_the_critical_pseudo_static_wedge(phi, delta, beta, kh):
    """Okabe (1926) / Kramer (1996) 11.6: closed form = maximised trial wedge (scipy)."""
    assert mononobe_okabe_kae(phi, delta, beta, kh) == pytest.approx(
        wedge_kae(phi, delta, beta, kh), rel=1e-6
    )


def test_no_solution_when_phi_minus_psi_minus_beta_is_negative():
    """phi - psi - beta < 0 has no M-O solution: NaN and not valid (module docstring)."""
    kh = 0.15  # psi = 8.53 deg
    assert mononobe_okabe_valid(30.0, 20.0, kh)
    assert not mononobe_okabe_valid(30.0, 26.57, kh)
    assert np.isnan(mononobe_okabe_kae(30.0, 26.57, 26.57, kh))
    assert np.isfinite(mononobe_okabe_kae(30.0, 20.0, 20.0, kh))


def test_seed_whitman_increment_order_of_magnitude():
    """Seed & Whitman (1970) [from memory]: Delta K_AE ~ 0.75 kh, level backfill (within 25 %)."""
    for kh in (0.1, 0.2):
        increment = mononobe_okabe_kae(35.0, 17.5, 0.0, kh) - mononobe_okabe_kae(
            35.0, 17.5, 0.0, 0.0
        )
        assert increment == pytest.approx(0.75 * kh, rel=0.25)


def test_kae_grows_with_kh():
    """More shaking, more thrust (physical sense, common practice, no source)."""
    k = mononobe_okabe_kae(34.0, 0.0, 0.0, np.linspace(0.0, 0.4, 9))
    assert np.all(np.diff(k) > 0)


def test_wall_coefficient_halves_where_movement_is_acceptable():
    """AASHTO LRFD 11.10.7.1 [from memory]: kh = 0.5 kh0 with 25-50 mm movement acceptable."""
    np.testing.assert_allclose(wall_kh(np.array([0.2, 0.2]), np.array([True, False])), [0.1, 0.2])


def test_active_zone_areas():
    """AASHTO Fig. 11.10.6.3.1-1 [from memory]: bilinear zone 0.3H wide over the top half,
    tapering to the toe: 0.15 H^2 + 0.075 H^2; Rankine wedge 0.5 H^2 tan(45 - phi/2)."""
    h = 6.0
    assert active_zone_area_m2(h, True, 34.0) == pytest.approx(0.225 * h**2)
    assert active_zone_area_m2(h, False, 30.0) == pytest.approx(
        0.5 * h**2 * np.tan(np.radians(30.0))
    )


def test_internal_inertia_shared_by_resistant_length():
    """AASHTO 11.10.7.2 [from memory]: T_md = P_I * Le_i / sum(Le); the shares add up to P_I."""
    le = np.array([[1.0, 2.0, 3.0, 0.0]])
    mask = np.array([[True, True, True, False]])
    t = share_by_resistant_length(np.array([60.0]), le, mask)
    np.testing.assert_allclose(t, [[10.0, 20.0, 30.0, 0.0]])
