"""Textbook problems for the mechanism check: strip footing, vertical cut, simple slope.

Each builder returns a :class:`Problem` with a domain large enough for the known mechanism
and a refinement box over it. They serve the validation tests and the speed script; the
wall cross-section has its own builder in ``section.py``.
"""

from __future__ import annotations

from screening.engine.mechanism.problem import (
    DEAD,
    Band,
    Footing,
    Material,
    Problem,
    Refinement,
    SurfaceLoad,
)


def footing_problem(
    *,
    width_m: float = 1.0,
    unit_weight_kn_m3: float = 0.0,
    cohesion_kpa: float = 1.0,
    friction_deg: float = 0.0,
    surcharge_kpa: float = 0.0,
    rough: bool = True,
    half_width_m: float | None = None,
    depth_m: float | None = None,
) -> Problem:
    """Rigid strip footing of width B centred at x = 0 on level ground (y = 0).

    The footing's load factor is its bearing pressure q_u (kPa): N_c = q_u / c for weightless
    Tresca soil, N_q = q_u / q with a surcharge q beside the footing on weightless
    cohesionless soil, N_gamma = 2 q_u / (gamma B) for heavy cohesionless soil.
    The domain reaches ``half_width_m`` each side (default 2B, 4B for phi > 25 deg) and
    ``depth_m`` down (default B, 2B for phi > 25 deg): Prandtl's mechanism for phi = 0 reaches
    B beyond each edge and B/sqrt(2) down; frictional ones reach further [pub, Prandtl 1920].
    """
    b = width_m
    wide = friction_deg > 25.0
    half = half_width_m if half_width_m is not None else (4.0 if wide else 2.0) * b
    depth = depth_m if depth_m is not None else (2.0 if wide else 1.0) * b
    soil = Material("soil", unit_weight_kn_m3, cohesion_kpa, friction_deg)
    band = Band(0, -half, half, -depth, -depth, 0.0, 0.0)
    loads = ()
    if surcharge_kpa:
        loads = (
            SurfaceLoad(-half, -b / 2, surcharge_kpa, DEAD),
            SurfaceLoad(b / 2, half, surcharge_kpa, DEAD),
        )
    reach = (3.0 if wide else 1.6) * b
    box = Refinement(
        x0_m=-reach,
        x1_m=reach,
        y0_m=-(1.2 if wide else 0.8) * b,
        y1_m=0.0,
        columns_m=(-b / 2, 0.0, b / 2),
        rows_m=(0.0,),
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
