"""Earth-pressure coefficients against published tables and an independent wedge search.

Sources:
- Rankine Ka = tan^2(45 - phi/2): the closed form in every soil-mechanics text; tabulated
  values 0.406 (25 deg), 0.333 (30 deg), 0.271 (35 deg) e.g. Das, *Principles of Geotechnical
  Engineering*, table of Rankine coefficients [from memory].
- Rankine for inclined backfill, Das, *Principles of Foundation Engineering*, table of Ka for
  an inclined granular backfill: beta = 10 deg, phi = 30 deg -> 0.3495 [from memory].
- Coulomb Ka for a vertical back and level ground, Das, *Principles of Foundation
  Engineering*, Coulomb table: phi = 30 deg, delta = 15 deg -> 0.3014; delta = 20 deg ->
  0.2973; phi = 35 deg, delta = 2/3 phi -> 0.2444 [from memory].
- Independent check: Coulomb's trial wedge maximised numerically with scipy.optimize
  (general-purpose reference library), which the closed form must reproduce.
"""

from __future__ import annotations

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

from screening.engine.checks.pressure import coulomb_ka, design_friction_deg, rankine_ka

TABLE_TOL = 5e-4
"""Published tables print 3-4 decimals."""


@pytest.mark.parametrize(("phi", "ka"), [(25.0, 0.406), (30.0, 0.3333), (35.0, 0.271)])
def test_rankine_level_table(phi: float, ka: float) -> None:
    assert rankine_ka(phi) == pytest.approx(ka, abs=TABLE_TOL)


@pytest.mark.parametrize(
    ("phi", "delta", "ka"),
    [(30.0, 0.0, 0.3333), (30.0, 15.0, 0.3014), (30.0, 20.0, 0.2973), (35.0, 35.0 * 2 / 3, 0.2444)],
)
def test_coulomb_vertical_back_level_ground_table(phi: float, delta: float, ka: float) -> None:
    assert coulomb_ka(phi, delta, 0.0) == pytest.approx(ka, abs=TABLE_TOL)


def test_coulomb_with_delta_equal_beta_matches_rankine_inclined_table() -> None:
    """Vertical back, delta = beta: Coulomb's thrust equals Rankine's for inclined backfill."""
    assert coulomb_ka(30.0, 10.0, 10.0) == pytest.approx(0.3495, abs=TABLE_TOL)


def test_coulomb_level_equals_rankine() -> None:
    phi = np.linspace(20.0, 45.0, 11)
    np.testing.assert_allclose(coulomb_ka(phi, 0.0, 0.0), rankine_ka(phi), rtol=1e-12)


def _wedge_ka(phi_deg: float, delta_deg: float, beta_deg: float) -> float:
    """Coulomb trial wedge behind a vertical back of unit height, unit weight 1.

    Wedge between the back and a plane through the heel at angle rho from horizontal; its
    weight is the triangle's area (vertical side 1, horizontal reach x to where the plane
    meets the ground). Force polygon: P = W sin(rho - phi) / cos(rho - phi - delta) with the
    thrust inclined at delta to the normal of the back. Ka = 2 * max over rho of P.
    """
    phi, delta, beta = np.radians([phi_deg, delta_deg, beta_deg])

    def neg_thrust(rho: float) -> float:
        # wedge vertices: heel (0,0), top of back (0,1), ground meets plane at x where
        # x tan(rho) = 1 + x tan(beta)
        x = 1.0 / (np.tan(rho) - np.tan(beta))
        weight = 0.5 * x * 1.0  # triangle with vertical side 1 and horizontal reach x
        return -weight * np.sin(rho - phi) / np.cos(rho - phi - delta)

    res = minimize_scalar(
        neg_thrust,
        bounds=(phi + 1e-6, np.pi / 2 - 1e-6),
        method="bounded",
        options={"xatol": 1e-12},
    )
    return -2.0 * res.fun


@pytest.mark.parametrize(
    ("phi", "delta", "beta"),
    [
        (30.0, 0.0, 0.0),
        (34.0, 20.0, 0.0),
        (30.0, 15.0, 15.0),
        (36.0, 10.0, 18.43),
        (32.0, 26.57, 26.57),
    ],
)
def test_coulomb_matches_numerical_trial_wedge(phi: float, delta: float, beta: float) -> None:
    assert coulomb_ka(phi, delta, beta) == pytest.approx(_wedge_ka(phi, delta, beta), rel=1e-6)


def test_partial_factor_on_tan_phi() -> None:
    """EN 1997-1 M2: gamma_phi' = 1.25 on tan phi' [from memory, Table A.4]: 30 deg -> 24.79 deg."""
    assert design_friction_deg(30.0, 1.25) == pytest.approx(
        np.degrees(np.arctan(np.tan(np.radians(30)) / 1.25))
    )
    assert design_friction_deg(30.0, 1.25) == pytest.approx(24.79, abs=0.01)
