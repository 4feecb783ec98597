"""Earth-pressure and bearing-capacity coefficients, elementwise over numpy arrays.

Angles are in degrees at the interface and radians inside. Every function broadcasts, so the
engine passes ``(n, 1)`` segment arrays against ``(c,)`` case factors and gets ``(n, c)`` back.
"""

from __future__ import annotations

import numpy as np
import numpy.typing as npt

from screening.engine.result import BoolArray, FloatArray

ArrayLike = npt.ArrayLike


def design_friction_deg(friction_deg: ArrayLike, tan_phi_factor: ArrayLike = 1.0) -> FloatArray:
    """phi_d = atan(tan(phi) / gamma_phi), degrees (EN 1997-1 2.4.6.2 partial factor on tan phi')."""
    phi = np.radians(np.asarray(friction_deg, dtype=np.float64))
    return np.degrees(np.arctan(np.tan(phi) / np.asarray(tan_phi_factor, dtype=np.float64)))


def rankine_ka(friction_deg: ArrayLike) -> FloatArray:
    """Rankine active coefficient for a vertical back and level ground: tan^2(45 - phi/2)."""
    phi = np.radians(np.asarray(friction_deg, dtype=np.float64))
    return np.tan(np.pi / 4 - phi / 2) ** 2


def coulomb_ka(
    friction_deg: ArrayLike,
    wall_friction_deg: ArrayLike = 0.0,
    backslope_deg: ArrayLike = 0.0,
    back_angle_deg: ArrayLike = 90.0,
) -> FloatArray:
    """Coulomb active coefficient, AASHTO LRFD Eq. 3.11.5.3-1 form.

    ``back_angle_deg`` is theta, the angle of the back face from the horizontal (90 = vertical);
    ``wall_friction_deg`` is delta; ``backslope_deg`` is beta. Where beta > phi the slope itself
    is not stable and the root is taken as zero (largest Ka of the formula); screening refers
    such slopes long before.
    """
    phi = np.radians(np.asarray(friction_deg, dtype=np.float64))
    delta = np.radians(np.asarray(wall_friction_deg, dtype=np.float64))
    beta = np.radians(np.asarray(backslope_deg, dtype=np.float64))
    theta = np.radians(np.asarray(back_angle_deg, dtype=np.float64))
    num = np.sin(phi + delta) * np.sin(phi - beta)
    den = np.sin(theta - delta) * np.sin(theta + beta)
    root = np.sqrt(np.clip(num / den, 0.0, None))
    gamma = (1.0 + root) ** 2
    return np.sin(theta + phi) ** 2 / (gamma * np.sin(theta) ** 2 * np.sin(theta - delta))


def vesic_factors(friction_deg: ArrayLike) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Bearing-capacity factors (Nc, Nq, N_gamma), Vesic (1973); AASHTO Table 10.6.3.1.2a-1.

    Nq = e^(pi tan phi) tan^2(45 + phi/2); Nc = (Nq - 1) cot phi, 2 + pi at phi = 0;
    N_gamma = 2 (Nq + 1) tan phi.
    """
    phi = np.radians(np.asarray(friction_deg, dtype=np.float64))
    tan = np.tan(phi)
    nq = np.exp(np.pi * tan) * np.tan(np.pi / 4 + phi / 2) ** 2
    small = np.abs(tan) < 1e-9
    nc = np.where(small, 2.0 + np.pi, (nq - 1.0) / np.where(small, 1.0, tan))
    ngamma = 2.0 * (nq + 1.0) * tan
    return nc, nq, ngamma


def seismic_angle_deg(kh: FloatArray, kv: FloatArray | float = 0.0) -> FloatArray:
    """psi = atan(kh / (1 - kv)), degrees."""
    return np.degrees(np.arctan2(np.asarray(kh, dtype=np.float64), 1.0 - np.asarray(kv)))


def mononobe_okabe_valid(
    friction_deg: FloatArray, backslope_deg: FloatArray, kh: FloatArray, kv: float = 0.0
) -> BoolArray:
    """True where M-O has a solution: phi - psi - beta >= 0."""
    return (
        np.asarray(friction_deg) - seismic_angle_deg(kh, kv) - np.asarray(backslope_deg) >= -1e-12
    )


def mononobe_okabe_kae(
    friction_deg: FloatArray,
    wall_friction_deg: FloatArray,
    backslope_deg: FloatArray,
    kh: FloatArray,
    kv: float = 0.0,
    back_batter_deg: FloatArray | float = 0.0,
) -> FloatArray:
    """Mononobe-Okabe K_AE (the formula and its sources: screening.engine.checks.seismic);
    NaN where phi - psi - beta < 0. ``back_batter_deg`` is theta, the back of the wall from
    the vertical (positive leaning over the backfill)."""
    phi = np.radians(np.asarray(friction_deg, dtype=np.float64))
    delta = np.radians(np.asarray(wall_friction_deg, dtype=np.float64))
    beta = np.radians(np.asarray(backslope_deg, dtype=np.float64))
    theta = np.radians(np.asarray(back_batter_deg, dtype=np.float64))
    psi = np.radians(seismic_angle_deg(kh, kv))
    valid = mononobe_okabe_valid(friction_deg, backslope_deg, kh, kv)
    s = np.sin(phi + delta) * np.sin(np.clip(phi - beta - psi, 0.0, None))
    d = np.cos(delta + theta + psi) * np.cos(beta - theta)
    root = np.sqrt(np.clip(s / d, 0.0, None))
    kae = np.cos(phi - theta - psi) ** 2 / (
        np.cos(psi) * np.cos(theta) ** 2 * np.cos(delta + theta + psi) * (1.0 + root) ** 2
    )
    return np.where(valid, kae, np.nan)
