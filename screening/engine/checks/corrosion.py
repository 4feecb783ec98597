"""Section loss of galvanised steel reinforcement over the design life (METHOD section 5).

Rates [from memory, AASHTO LRFD 11.10.6.4.2a, for fill meeting the electrochemical limits]:
zinc is lost at 15 um/yr per side for the first 2 years, then 4 um/yr per side until it is
gone; carbon steel then corrodes at 12 um/yr per side for the rest of the design life.
"""

from __future__ import annotations

import numpy as np
import numpy.typing as npt

from screening.engine.result import FloatArray

ZINC_EARLY_UM_PER_YR = 15.0
ZINC_EARLY_YEARS = 2.0
ZINC_LATER_UM_PER_YR = 4.0
STEEL_UM_PER_YR = 12.0


def zinc_life_years(zinc_um: npt.ArrayLike) -> FloatArray:
    """Years until the zinc coating (um per side) is consumed."""
    z = np.asarray(zinc_um, dtype=np.float64)
    early_um = ZINC_EARLY_UM_PER_YR * ZINC_EARLY_YEARS
    return np.where(
        z <= early_um,
        z / ZINC_EARLY_UM_PER_YR,
        ZINC_EARLY_YEARS + (z - early_um) / ZINC_LATER_UM_PER_YR,
    )


def steel_loss_per_side_mm(zinc_um: npt.ArrayLike, life_years: npt.ArrayLike) -> FloatArray:
    """E_R: carbon-steel thickness lost per side by the end of the design life, mm."""
    exposed_years = np.maximum(
        np.asarray(life_years, dtype=np.float64) - zinc_life_years(zinc_um), 0.0
    )
    return STEEL_UM_PER_YR * exposed_years / 1000.0


def strip_area_mm2_per_m(
    strips_per_m: npt.ArrayLike,
    width_mm: npt.ArrayLike,
    thickness_mm: npt.ArrayLike,
    loss_mm: npt.ArrayLike,
) -> FloatArray:
    """A_c = n * b * (t - 2 E_R) per metre run of wall, mm2 (never negative)."""
    t_left = np.maximum(np.asarray(thickness_mm) - 2 * np.asarray(loss_mm), 0.0)
    return np.asarray(strips_per_m) * np.asarray(width_mm) * t_left


def bar_area_mm2_per_m(
    bars_per_m: npt.ArrayLike, diameter_mm: npt.ArrayLike, loss_mm: npt.ArrayLike
) -> FloatArray:
    """A_c = bars * pi/4 * (D - 2 E_R)^2 per metre run of wall, mm2."""
    d_left = np.maximum(np.asarray(diameter_mm) - 2 * np.asarray(loss_mm), 0.0)
    return np.asarray(bars_per_m) * np.pi / 4 * d_left**2
