"""One wall cross-section for the mechanism check, in SI, and its plane-strain model.

Coordinates as in the slip-circle check: x (m) from the face into the fill, y (m) up from
the base of the reinforced zone. The ground in front is at the embedment depth y = d, with a
level bench and a toe slope falling ``toe_slope_fall_m`` when there is one, then level; the
face is vertical from y = d to the top y = H; the top rises at the backslope angle from the
face without a break. Soils: foundation below y = 0 and in front of the face, reinforced fill
in 0 <= x <= L, 0 <= y <= H, retained fill behind x = L and above the wall top. Dead and live
surcharges act on the ground behind the face (x > 0). The firm layer (fixed base of the
model) lies ``depth_to_firm_m`` below the base of the reinforced zone; both far sides are
fixed and far enough not to matter (METHOD.md).

With layers, the facing holds the face above the top layer: no mechanism leaves the face
there (the facing spans from the top layer to the wall top, as it does in the internal
checks; without it a cohesionless vertical face above the top layer collapses at any
strength, lambda = 0, whatever the wall below it does) [cp].
"""

from __future__ import annotations

import math
from dataclasses import dataclass, fields

from screening.engine.mechanism.problem import (
    DEAD,
    LIVE,
    Band,
    Layer,
    Material,
    Problem,
    Refinement,
    SurfaceLoad,
)
from screening.model.errors import InputError

BENCH_M = 1.2
"""Level bench in front of the face before a toe slope [mem, AASHTO C11.10.2.2, as in the
slip-circle check]."""
FIRM_DEPTH_RATIO = 2.0
"""Default depth to the firm layer below the base, times H (METHOD.md, 'depth to firm layer')."""
FIRM_BELOW_TOE_RATIO = 1.0
"""... and at least this times H below the foot of a toe slope."""
FRONT_RATIO, BACK_RATIO = 2.0, 2.5
"""Model extent in front of the toe (slope foot) and behind the reinforced zone, times H."""
LAYER_NUDGE_M = 0.005
"""A layer lying on the toe level is moved up by this much so that no node sits on it."""


@dataclass(frozen=True)
class SoilStrength:
    """One soil: unit weight and Mohr-Coulomb strength; with ``undrained_strength_kpa`` set
    the soil is undrained (Tresca, c = cu, phi = 0) and c', phi' are not used."""

    unit_weight_kn_m3: float
    cohesion_kpa: float = 0.0
    friction_deg: float = 30.0
    undrained_strength_kpa: float | None = None

    def material(self, name: str) -> Material:
        if self.undrained_strength_kpa is not None:
            return Material(name, self.unit_weight_kn_m3, self.undrained_strength_kpa, 0.0)
        return Material(name, self.unit_weight_kn_m3, self.cohesion_kpa, self.friction_deg)


@dataclass(frozen=True)
class MechanismLayer:
    """A reinforcement layer over the full length L, per metre run of wall."""

    level_m: float
    """Height above the base of the reinforced zone."""
    strength_kn_m: float
    """Long-term tensile strength."""
    pullout_kn_m2: float
    """Pullout resistance per metre of anchorage, F* alpha sigma'v C Rc at the layer."""
    connection_kn_m: float
    """Hold of the facing on the front end."""


@dataclass(frozen=True)
class MechanismSection:
    """One wall cross-section (module docstring for the geometry)."""

    design_height_m: float
    embedment_m: float
    length_m: float
    foundation: SoilStrength
    reinforced: SoilStrength
    retained: SoilStrength
    layers: tuple[MechanismLayer, ...] = ()
    backslope_deg: float = 0.0
    toe_slope_deg: float = 0.0
    toe_slope_fall_m: float = 0.0
    depth_to_firm_m: float | None = None
    """Below the base of the reinforced zone; None: FIRM_DEPTH_RATIO x H (METHOD.md)."""
    water_level_m: float = -math.inf
    """Level of a level water table above the base (negative below it); -inf: none."""
    dead_surcharge_kpa: float = 0.0
    live_surcharge_kpa: float = 0.0
    segment_id: str = ""

    def __post_init__(self) -> None:
        for name, ok, valid in _rules(self):
            if not ok:
                value = getattr(self, name, None)
                raise InputError(
                    f"{value!r} is outside the mechanism check: {valid}",
                    segment=self.segment_id or None,
                    field=name,
                )

    @property
    def has_toe_slope(self) -> bool:
        return self.toe_slope_deg > 0.01 and self.toe_slope_fall_m > 0.0

    @property
    def firm_depth_m(self) -> float:
        if self.depth_to_firm_m is not None:
            return self.depth_to_firm_m
        h = self.design_height_m
        below_toe = self.toe_slope_fall_m - self.embedment_m if self.has_toe_slope else 0.0
        return max(FIRM_DEPTH_RATIO * h, below_toe + FIRM_BELOW_TOE_RATIO * h)


def _rules(s: MechanismSection):
    h = s.design_height_m
    ground_front = s.embedment_m - (s.toe_slope_fall_m if s.has_toe_slope else 0.0)
    yield "design_height_m", h > 0, "a height above 0 m"
    yield "embedment_m", 0 <= s.embedment_m < h, "at least 0 m and less than the design height"
    yield "length_m", s.length_m > 0, "a length above 0 m"
    yield "backslope_deg", 0 <= s.backslope_deg < 45, "0 to less than 45 degrees"
    yield "toe_slope_deg", 0 <= s.toe_slope_deg < 60, "0 to less than 60 degrees"
    yield "toe_slope_fall_m", s.toe_slope_fall_m >= 0, "0 m or more"
    yield (
        "depth_to_firm_m",
        s.depth_to_firm_m is None or s.depth_to_firm_m > -ground_front,
        "below the ground in front of the wall (deeper than the toe-slope foot)",
    )
    yield (
        "water_level_m",
        s.water_level_m <= ground_front,
        "at or below the ground in front of the wall (a flooded toe is not modelled)",
    )
    yield "dead_surcharge_kpa", s.dead_surcharge_kpa >= 0, "0 kPa or more"
    yield "live_surcharge_kpa", s.live_surcharge_kpa >= 0, "0 kPa or more"
    for name in ("foundation", "reinforced", "retained"):
        soil = getattr(s, name)
        cu = soil.undrained_strength_kpa
        good = (
            soil.unit_weight_kn_m3 >= 0
            and soil.cohesion_kpa >= 0
            and 0 <= soil.friction_deg < 60
            and (cu is None or cu > 0)
        )
        yield name, good, "unit weight >= 0, c' >= 0, phi' 0 to 60 degrees, cu above 0"
    for i, lay in enumerate(s.layers):
        good = (
            0 < lay.level_m < h
            and min(lay.strength_kn_m, lay.pullout_kn_m2, lay.connection_kn_m) >= 0
        )
        yield f"layers[{i}]", good, "a level inside the wall and strengths of 0 or more"


def wall_problem(s: MechanismSection) -> Problem:
    """The plane-strain model of a wall cross-section (module docstring)."""
    h, d, length = s.design_height_m, s.embedment_m, s.length_m
    tb = math.tan(math.radians(s.backslope_deg))
    fall = s.toe_slope_fall_m if s.has_toe_slope else 0.0
    run = fall / math.tan(math.radians(s.toe_slope_deg)) if s.has_toe_slope else 0.0
    bench = BENCH_M if s.has_toe_slope else 0.0
    foot = -(bench + run)
    x_front = foot - FRONT_RATIO * h
    x_back = length + BACK_RATIO * h
    base = -s.firm_depth_m
    found, reinf, ret = 0, 1, 2
    bands = [Band(found, x_front, foot if fall else 0.0, base, base, d - fall, d - fall)]
    if fall:
        bands.append(Band(found, foot, -bench, base, base, d - fall, d))
        bands.append(Band(found, -bench, 0.0, base, base, d, d))
    bands.append(Band(found, 0.0, x_back, base, base, 0.0, 0.0))
    bands.append(Band(reinf, 0.0, length, 0.0, 0.0, h, h))
    if tb > 0:
        bands.append(Band(ret, 0.0, length, h, h, h, h + length * tb))
    bands.append(Band(ret, length, x_back, 0.0, 0.0, h + length * tb, h + x_back * tb))
    levels = sorted(lay.level_m for lay in s.layers)
    layers = tuple(
        Layer(
            lay.level_m + (LAYER_NUDGE_M if abs(lay.level_m - d) < LAYER_NUDGE_M else 0.0),
            0.0,
            length,
            lay.strength_kn_m,
            lay.pullout_kn_m2,
            lay.connection_kn_m,
        )
        for lay in s.layers
    )
    between = tuple(0.5 * (a + b) for a, b in zip(levels[:-1], levels[1:], strict=True))
    loads = tuple(
        SurfaceLoad(0.0, x_back, q, kind)
        for q, kind in ((s.dead_surcharge_kpa, DEAD), (s.live_surcharge_kpa, LIVE))
        if q > 0
    )
    box = Refinement(
        x0_m=foot - 0.5 * h,
        x1_m=length + 1.0 * h,
        y0_m=min(-0.5 * h, d - fall - 0.3 * h),
        y1_m=h + (length + h) * tb,
        columns_m=tuple(sorted({0.0, length, -bench, foot})),
        rows_m=(0.0, h, *between),
        local_rows=((x_front, 0.0, d), (x_front, 0.0, d - fall)),
    )
    return Problem(
        materials=(
            s.foundation.material("foundation"),
            s.reinforced.material("reinforced fill"),
            s.retained.material("retained fill"),
        ),
        bands=tuple(bands),
        refinement=box,
        surface_loads=loads,
        layers=layers,
        water_level_m=s.water_level_m,
        label=s.segment_id or "wall",
        held_faces=((0.0, max(levels), h),) if levels else (),
    )


def section_fields() -> tuple[str, ...]:
    """Field names of MechanismSection (for the adapter and its messages)."""
    return tuple(f.name for f in fields(MechanismSection))
