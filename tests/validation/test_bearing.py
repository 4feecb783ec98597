"""Vesic bearing-capacity factors against AASHTO LRFD Table 10.6.3.1.2a-1 (Vesic 1973).

The phi = 30 and 35 deg rows are quoted in the project's METHOD page from the AASHTO table;
the 0, 25 and 40 deg rows are the same table [from memory]. The table prints two decimals.
"""

from __future__ import annotations

import numpy as np
import pytest

from screening.engine.checks.pressure import vesic_factors

TABLE_TOL = 0.01


@pytest.mark.parametrize(
    ("phi", "nc", "nq", "ngamma"),
    [
        (0.0, 5.14, 1.00, 0.00),
        (25.0, 20.72, 10.66, 10.88),
        (30.0, 30.14, 18.40, 22.40),
        (35.0, 46.12, 33.30, 48.03),
        (40.0, 75.31, 64.20, 109.41),
    ],
)
def test_vesic_table(phi: float, nc: float, nq: float, ngamma: float) -> None:
    got = vesic_factors(phi)
    assert float(got[0]) == pytest.approx(nc, abs=TABLE_TOL)
    assert float(got[1]) == pytest.approx(nq, abs=TABLE_TOL)
    assert float(got[2]) == pytest.approx(ngamma, abs=TABLE_TOL)


def test_vesic_vectorised_and_continuous_at_zero() -> None:
    """Nc -> 2 + pi as phi -> 0 (Prandtl), and the array form equals the scalar form."""
    phi = np.array([0.0, 1e-6, 30.0])
    nc, nq, ng = vesic_factors(phi)
    assert nc[1] == pytest.approx(2 + np.pi, rel=1e-5)
    assert nc[2] == pytest.approx(float(vesic_factors(30.0)[0]))
    assert ng[0] == 0.0
