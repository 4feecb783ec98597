"""Steel section loss over the design life.

AASHTO LRFD 11.10.6.4.2a [from memory]: zinc loss 15 um/yr per side for the first 2 years,
4 um/yr thereafter; carbon steel 12 um/yr per side once the zinc is gone. The commentary
works the usual 86 um (610 g/m2) coating to a zinc life of about 16 years [from memory].
The worked figure below for a 50 x 4 mm strip over 75 years follows from those rates:
E_R = 12 um/yr x (75 - 16) yr = 0.708 mm per side, E_c = 4 - 2 x 0.708 = 2.584 mm
(FHWA GEC 11 ch. 4 example strips come out at about 2.58 mm [from memory]).
"""

from __future__ import annotations

import numpy as np
import pytest

from screening.engine.checks.corrosion import (
    bar_area_mm2_per_m,
    steel_loss_per_side_mm,
    strip_area_mm2_per_m,
    zinc_life_years,
)


def test_zinc_life_of_86_um() -> None:
    assert float(zinc_life_years(86.0)) == pytest.approx(16.0)


def test_thin_coating_consumed_in_the_fast_period() -> None:
    assert float(zinc_life_years(15.0)) == pytest.approx(1.0)
    assert float(zinc_life_years(30.0)) == pytest.approx(2.0)


def test_four_mm_strip_over_75_years() -> None:
    loss = float(steel_loss_per_side_mm(86.0, 75.0))
    assert loss == pytest.approx(0.708)
    assert 4.0 - 2 * loss == pytest.approx(2.58, abs=0.01)  # GEC 11 order [from memory]
    area = float(strip_area_mm2_per_m(1.0, 50.0, 4.0, loss))
    assert area == pytest.approx(50.0 * 2.584)


def test_hundred_year_abutment_and_no_loss_while_zinc_lasts() -> None:
    np.testing.assert_allclose(
        steel_loss_per_side_mm(86.0, np.array([10.0, 16.0, 100.0])), [0.0, 0.0, 1.008]
    )


def test_bar_area_after_loss() -> None:
    """A mat bar 9.5 mm over 75 years: D* = 9.5 - 2 x 0.708 = 8.084 mm."""
    area = float(bar_area_mm2_per_m(3.0, 9.5, 0.708))
    assert area == pytest.approx(3 * np.pi / 4 * 8.084**2)


def test_loss_never_makes_a_negative_section() -> None:
    assert float(strip_area_mm2_per_m(2.0, 50.0, 1.0, 5.0)) == 0.0
