"""Textbook problems for the mechanism check: strip footing, vertical cut, simple slope.

Each builder returns a :class:`Problem` with a domain large enough for the known mechanism
and a refinement box over it. They serve the validation tests and the speed script; the
wall cross-section has its own builder in ``section.py``.
"""

from __future__ import annotations

import math

from screening.engine.mechanism.problem import (
    DEAD,
    Band,
    Footing,
    Material,
    Problem,
    Refinement,
    SurfaceLoad,
)


def prandtl_extent(width_m: float, friction_deg: float) -> tuple[float, float]:
    """Half-width (from the footing centre) and depth of Prandtl's mechanism [pub, Prandtl
    1920; Reissner 1924]: wedge at 45 + phi/2 under the footing, log-spiral fan from radius
    r0 = B / (2 cos(45 + phi/2)) to r1 = r0 exp(pi/2 tan phi), passive wedge at 45 - phi/2.
    The depth is the fan's radius a quarter turn in, a round figure that covers it."""
    phi = math.radians(friction_deg)
    r0 = width_m / (2.0 * math.cos(math.pi / 4 + phi / 2))
    r1 = r0 * math.exp(math.pi / 2 * math.tan(phi))
    half = width_m / 2 + 2.0 * r1 * math.cos(math.pi / 4 - phi / 2)
    return half, r0 * math.exp(math.pi / 4 * math.tan(phi))


def footing_problem(
    *,
    width_m: float = 1.0,
    unit_weight_kn_m3: float = 0.0,
    cohesion_kpa: float = 1.0,
    friction_deg: float = 0.0,
    surcharge_kpa: float = 0.0,
    rough: bool = True,
    extent_scale: tuple[float, float] | None = None,
    focus_ratio: float | None = None,
) -> Problem:
    """Rigid strip footing of width B centred at x = 0 on level ground (y = 0).

    The footing's load factor is its bearing pressure q_u (kPa): N_c = q_u / c for weightless
    Tresca soil, N_q = q_u / q with a surcharge q beside the footing on weightless
    cohesionless soil, N_gamma = 2 q_u / (gamma B) for heavy cohesionless soil. The domain
    reaches 1.1 times Prandtl's mechanism each side and 1.2 times its depth (its fixed sides
    then lie just outside it); the fine box covers the mechanism itself. ``extent_scale``
    shrinks that (default (0.45, 0.6) for self weight alone: the N_gamma mechanism is much
    smaller than the surcharge one, so the nodes go where it is). ``focus_ratio`` refines the
    columns at the footing edges and the ground row (default 0.4 for phi > 0, where the fans
    at the edges carry most of the discretisation error; none for phi = 0, measured no gain).
    """
    b = width_m
    weight_only = unit_weight_kn_m3 > 0 and cohesion_kpa == 0 and surcharge_kpa == 0
    sx, sy = extent_scale or ((0.45, 0.6) if weight_only else (1.0, 1.0))
    focus = focus_ratio if focus_ratio is not None else (0.4 if friction_deg > 0 else 1.0)
    reach, deep = prandtl_extent(b, friction_deg)
    reach, deep = sx * reach, sy * deep
    half, depth = 1.1 * reach, 1.2 * deep
    soil = Material("soil", unit_weight_kn_m3, cohesion_kpa, friction_deg)
    band = Band(0, -half, half, -depth, -depth, 0.0, 0.0)
    loads = ()
    if surcharge_kpa:
        loads = (
            SurfaceLoad(-half, -b / 2, surcharge_kpa, DEAD),
            SurfaceLoad(b / 2, half, surcharge_kpa, DEAD),
        )
    box = Refinement(
        x0_m=-1.03 * reach,
        x1_m=1.03 * reach,
        y0_m=-1.06 * deep,
        y1_m=0.0,
        columns_m=(-b / 2, 0.0, b / 2),
        rows_m=(0.0,),
        grading=0.6,
        focus_columns_m=(-b / 2, b / 2) if focus < 1.0 else (),
        focus_rows_m=(0.0,) if focus < 1.0 else (),
        focus_ratio=focus,
    )
    return Problem(
        materials=(soil,),
        bands=(band,),
        refinement=box,
        surface_loads=loads,
        footing=Footing(-b / 2, b / 2, rough),
        label="strip footing",
    )


def slope_problem(
    *,
    height_m: float,
    run_m: float,
    unit_weight_kn_m3: float,
    cohesion_kpa: float,
    friction_deg: float,
    depth_m: float | None = None,
    front_m: float | None = None,
    back_m: float | None = None,
) -> Problem:
    """A straight slope rising ``height_m`` over ``run_m`` from its toe at (0, 0), level
    ground in front and behind, one soil, firm base ``depth_m`` below the toe (default H).
    ``run_m = 0`` is a vertical cut."""
    h = height_m
    depth = depth_m if depth_m is not None else h
    front = front_m if front_m is not None else 1.5 * h + 0.5 * run_m
    back = back_m if back_m is not None else 1.5 * h + 0.5 * run_m
    soil = Material("soil", unit_weight_kn_m3, cohesion_kpa, friction_deg)
    bands = [Band(0, -front, 0.0, -depth, -depth, 0.0, 0.0)]
    if run_m > 0:
        bands.append(Band(0, 0.0, run_m, -depth, -depth, 0.0, h))
    bands.append(Band(0, run_m, run_m + back, -depth, -depth, h, h))
    # one band per x-interval of one material: the bands meet side by side only
    box = Refinement(
        x0_m=-0.6 * h - 0.2 * run_m,
        x1_m=run_m + 0.6 * h,
        y0_m=-0.4 * h,
        y1_m=h,
        columns_m=(0.0, run_m),
        rows_m=(0.0, h),
    )
    return Problem(
        materials=(soil,),
        bands=tuple(bands),
        refinement=box,
        label="slope" if run_m > 0 else "vertical cut",
    )
