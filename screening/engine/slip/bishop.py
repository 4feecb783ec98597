"""Factor of safety of circular slip surfaces by the method of slices.

Bishop's simplified method [pub, Bishop 1955, Geotechnique 5(1)]: with the slice base
inclination alpha, width b, weight W, pore pressure u and strength (c', tan phi'),

    F = (R * sum[(c' b + (W - u b) tan phi') / m_alpha] + M_extra) / (R * sum[W sin alpha] + M_drive)
    m_alpha = cos alpha + sin alpha tan phi' / F,

solved by fixed-point iteration from the ordinary (Fellenius) value until |dF| < tol.
``M_extra`` is the restoring moment of reinforcement and ``M_drive`` any additional driving
moment (pseudo-static inertia). Where m_alpha falls below 0.2 on a frictional base it is held
at 0.2, the usual guard against the toe-slice singularity [mem, Whitman & Bailey 1967].

The ordinary method of slices [pub, Fellenius 1936]: N' = W cos alpha - u b / cos alpha,
F = (R * sum[c' b / cos alpha + N' tan phi'] + M_extra) / (R * sum[W sin alpha] + M_drive).

Both work on arrays of any leading shape with slices on the last axis.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from screening.engine.result import BoolArray, FloatArray

M_ALPHA_MIN = 0.2
TOLERANCE = 1e-4
MAX_ITERATIONS = 60
_TINY = 1e-9


@dataclass(frozen=True)
class SliceForces:
    """Everything Bishop needs per slice; arrays ``(..., s)``, ``radius_m`` is ``(...)``."""

    weight_kn: FloatArray
    width_m: FloatArray
    sin_a: FloatArray
    cos_a: FloatArray
    cohesion_kpa: FloatArray
    tan_phi: FloatArray
    pore_kpa: FloatArray
    radius_m: FloatArray


@dataclass(frozen=True)
class Factor:
    """Factor of safety per surface with how the iteration ended."""

    value: FloatArray
    """F; +inf where the mass drives no rotation (no failure in that direction)."""
    converged: BoolArray
    iterations: int


def _driving(f: SliceForces, extra_drive: FloatArray) -> FloatArray:
    return f.radius_m * np.add.reduce(f.weight_kn * f.sin_a, axis=-1) + extra_drive


def ordinary_factor(
    f: SliceForces, extra_restoring: FloatArray | float = 0.0, extra_drive: FloatArray | float = 0.0
) -> FloatArray:
    """Fellenius' ordinary method of slices (see module docstring)."""
    drive = _driving(f, np.asarray(extra_drive, dtype=np.float64))
    active = drive > _TINY
    return _ordinary(f, extra_restoring, active, np.where(active, drive, 1.0))


def _ordinary(f: SliceForces, extra_restoring, active, safe_drive) -> FloatArray:
    """Ordinary factor given the driving moment (where ``active``; 1.0 elsewhere)."""
    cos_a = np.maximum(f.cos_a, _TINY)
    normal = np.maximum(f.weight_kn * cos_a - f.pore_kpa * f.width_m / cos_a, 0.0)
    resist = np.sum(f.cohesion_kpa * f.width_m / cos_a + normal * f.tan_phi, axis=-1)
    num = f.radius_m * resist + extra_restoring
    return np.where(active, num / safe_drive, np.inf)


def bishop_factor(
    f: SliceForces,
    extra_restoring: FloatArray | float = 0.0,
    extra_drive: FloatArray | float = 0.0,
    tolerance: float = TOLERANCE,
    max_iterations: int = MAX_ITERATIONS,
) -> Factor:
    """Bishop's simplified factor of safety for every surface (see module docstring).

    Iterates all surfaces together until each changes by less than ``tolerance``; surfaces
    still moving after ``max_iterations`` come back with ``converged`` False, never silently.
    """
    drive = _driving(f, np.asarray(extra_drive, dtype=np.float64))
    active = drive > _TINY
    safe_drive = np.where(active, drive, 1.0)
    effective = np.maximum(f.weight_kn - f.pore_kpa * f.width_m, 0.0)
    top = f.radius_m[..., None] * (f.cohesion_kpa * f.width_m + effective * f.tan_phi)
    floor = np.where(f.tan_phi > 0, M_ALPHA_MIN, _TINY).astype(top.dtype)
    slope = f.sin_a * f.tan_phi
    restoring = np.broadcast_to(np.asarray(extra_restoring, dtype=top.dtype), drive.shape)
    factor = _ordinary(f, extra_restoring, active, safe_drive)
    factor = np.where(active & np.isfinite(factor) & (factor > 0), factor, 1.0)
    # Iterate on every surface while most still move, then gather the few that do once and
    # iterate on those alone (a handful of slow surfaces must not keep the whole batch busy).
    shape = drive.shape
    flat = lambda a: a.reshape(-1, a.shape[-1])  # noqa: E731
    full = lambda a: a if a.shape == top.shape else np.broadcast_to(a, top.shape)  # noqa: E731
    cos_a = flat(full(f.cos_a))
    slope_f, top_f = flat(slope), flat(top)
    floor_f = flat(full(floor))
    rest_f, drive_f = restoring.reshape(-1), safe_drive.reshape(-1)
    factor = factor.reshape(-1).copy()
    moving = active.reshape(-1).copy()
    iterations = 0
    while iterations < max_iterations and moving.any():
        iterations += 1
        if 4 * np.count_nonzero(moving) > moving.size:  # more than a quarter still move
            m_alpha = np.maximum(cos_a + slope_f / np.maximum(factor, _TINY)[:, None], floor_f)
            new = np.maximum((np.sum(top_f / m_alpha, axis=-1) + rest_f) / drive_f, 0.0)
            # Each surface stops at its own convergence, whatever else is in the batch.
            step = np.abs(new - factor)
            factor = np.where(moving, new, factor)
            moving &= step >= tolerance
            continue
        todo = np.flatnonzero(moving)
        c, sl, tp, fl = cos_a[todo], slope_f[todo], top_f[todo], floor_f[todo]
        rs, dr, val = rest_f[todo], drive_f[todo], factor[todo]
        still = np.ones(todo.size, dtype=bool)
        while iterations <= max_iterations:
            m_alpha = np.maximum(c + sl / np.maximum(val, _TINY)[:, None], fl)
            new = np.maximum((np.sum(tp / m_alpha, axis=-1) + rs) / dr, 0.0)
            step = np.abs(new - val)
            val = np.where(still, new, val)
            still &= step >= tolerance
            if not still.any() or iterations == max_iterations:
                break
            iterations += 1
        factor[todo] = val
        moving[todo] = still
        break
    converged = ~moving
    factor = factor.reshape(shape)
    converged = converged.reshape(shape)
    value = np.where(active, factor, np.inf)
    return Factor(value, converged | ~active, iterations)
