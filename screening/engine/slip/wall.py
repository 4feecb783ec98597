"""Cross-sections of MSE wall segments for the slip search (METHOD section 6).

Coordinates: x from the face into the fill, y up from the base of the reinforced zone. The
ground line runs level in front of the face at the embedment depth (with a bench and a toe
slope when there is one), up the face, and along the wall top and any backslope behind.

Screening assumptions [cp]: a 1.2 m bench in front of the face before a toe slope [mem, AASHTO
C11.10.2.2: at least 4 ft in front of walls on slopes]; a toe slope falls one design height
unless told otherwise; a backslope rises without a break; surcharges act on the ground behind
the face; the facing holds the front end of each layer as strongly as the layer itself unless
told otherwise (a structural facing with its connections).
"""

from __future__ import annotations

from dataclasses import dataclass, fields, replace

import numpy as np

from screening.engine.result import BoolArray, FloatArray
from screening.engine.slip.density import SearchDensity
from screening.engine.slip.geometry import SlipLayers, SlipSection, SlipSoils
from screening.engine.slip.search import Bounds

BENCH_M = 1.2
"""Level bench in front of the face before a toe slope starts [mem, AASHTO C11.10.2.2]."""
_FAR = 50.0


@dataclass(frozen=True)
class WallSlipInput:
    """Everything the compound check needs for ``n`` segments: (n,) arrays, layers (n, m)."""

    height_m: FloatArray
    """Design height H (exposed + embedment)."""
    embedment_m: FloatArray
    length_m: FloatArray
    backslope_deg: FloatArray
    toe_slope_deg: FloatArray
    toe_slope_height_m: FloatArray
    """Fall of the toe slope below the ground at the face (used only where toe_slope_deg > 0)."""
    fill_unit_weight_kn_m3: FloatArray
    fill_cohesion_kpa: FloatArray
    fill_friction_deg: FloatArray
    retained_unit_weight_kn_m3: FloatArray
    retained_cohesion_kpa: FloatArray
    retained_friction_deg: FloatArray
    found_unit_weight_kn_m3: FloatArray
    found_cohesion_kpa: FloatArray
    found_friction_deg: FloatArray
    found_undrained_kpa: FloatArray
    """cu; NaN for a drained foundation."""
    found_water_depth_m: FloatArray
    surcharge_kpa: FloatArray
    """Permanent uniform surcharge behind the face."""
    live_kpa: FloatArray
    """Traffic surcharge behind the face."""
    abutment: BoolArray
    layer_level_m: FloatArray
    """Height of each layer above the base, (n, m)."""
    layer_mask: BoolArray
    layer_rupture_kn_m: FloatArray
    """Nominal long-term tensile strength per metre run, (n, m)."""
    layer_pullout_kn_m2: FloatArray
    """Nominal pullout resistance per metre of embedded length, per metre run, (n, m)."""
    layer_front_kn_m: FloatArray | None = None
    """Facing hold of the front end, (n, m); None: as strong as the layer [cp]."""
    tangent: BoolArray | None = None
    """(n,) True for continuous extensible sheets (geosynthetics): force along the circle."""
    firm_depth_m: FloatArray | None = None
    """(n,) depth of a firm layer below the base that no circle passes (inf: none)."""

    @property
    def n(self) -> int:
        return int(self.height_m.shape[0])

    def take(self, rows: np.ndarray) -> WallSlipInput:
        """The same input for a subset of segments (itself for all of them, in order: it is
        frozen)."""
        rows = np.asarray(rows)
        if rows.dtype != bool and rows.size == self.n and np.array_equal(rows, np.arange(self.n)):
            return self
        return replace(
            self,
            **{
                f.name: getattr(self, f.name)[rows]
                for f in fields(self)
                if getattr(self, f.name) is not None
            },
        )


@dataclass(frozen=True)
class Factors:
    """One load/strength case for the slip search (scalars)."""

    name: str
    weight: float = 1.0
    permanent: float = 1.0
    live: float = 1.0
    tan_phi: float = 1.0
    cohesion: float = 1.0
    undrained: float = 1.0


def wall_section(inp: WallSlipInput, f: Factors) -> SlipSection:
    """Ground line, water and surcharge of every segment (module docstring for assumptions)."""
    h, d, length = inp.height_m, inp.embedment_m, inp.length_m
    toe = np.radians(np.clip(inp.toe_slope_deg, 0.0, 80.0))
    fall = np.where(toe > 1e-6, inp.toe_slope_height_m, 0.0)
    run = np.where(toe > 1e-6, fall / np.where(toe > 1e-6, np.tan(toe), 1.0), 0.0)
    bench = np.where(toe > 1e-6, BENCH_M, 0.0)
    far_front = -(bench + run + 10.0 * h + _FAR)
    far_back = length + 10.0 * h + _FAR
    beta = np.tan(np.radians(np.clip(inp.backslope_deg, 0.0, 60.0)))
    gx = np.stack(
        [far_front, -(bench + run), -bench, np.zeros_like(h), np.zeros_like(h), far_back], 1
    )
    gy = np.stack([d - fall, d - fall, d, d, h, h + far_back * beta], 1)
    return SlipSection(
        ground_x_m=gx,
        ground_y_m=gy,
        height_m=h,
        length_m=length,
        water_level_m=-inp.found_water_depth_m,
        surcharge_kpa=f.permanent * inp.surcharge_kpa + f.live * inp.live_kpa,
        floor_m=-search_depth_m(inp),
    )


DEPTH_PER_HEIGHT = 2.0
"""Deepest circle below the base, in design heights, when no firm layer is nearer [cp]."""


def search_depth_m(inp: WallSlipInput) -> FloatArray:
    """Depth below the base that circles may reach: the firm layer, at most 2H (n,)."""
    firm = inp.firm_depth_m if inp.firm_depth_m is not None else np.full(inp.n, np.inf)
    return np.minimum(firm, DEPTH_PER_HEIGHT * inp.height_m)


def wall_soils(inp: WallSlipInput, f: Factors, undrained: bool) -> SlipSoils:
    """Design strengths of foundation, reinforced and retained soil, (n, 3)."""

    def tan(deg: FloatArray) -> FloatArray:
        return np.tan(np.radians(deg)) / f.tan_phi

    gamma = f.weight * np.stack(
        [inp.found_unit_weight_kn_m3, inp.fill_unit_weight_kn_m3, inp.retained_unit_weight_kn_m3], 1
    )
    if undrained:
        found_c = np.nan_to_num(inp.found_undrained_kpa) / f.undrained
        found_t = np.zeros_like(found_c)
    else:
        found_c = inp.found_cohesion_kpa / f.cohesion
        found_t = tan(inp.found_friction_deg)
    cohesion = np.stack(
        [found_c, inp.fill_cohesion_kpa / f.cohesion, inp.retained_cohesion_kpa / f.cohesion], 1
    )
    tan_phi = np.stack([found_t, tan(inp.fill_friction_deg), tan(inp.retained_friction_deg)], 1)
    return SlipSoils(gamma, cohesion, tan_phi)


def wall_layers(inp: WallSlipInput) -> SlipLayers:
    front = inp.layer_rupture_kn_m if inp.layer_front_kn_m is None else inp.layer_front_kn_m
    return SlipLayers(
        level_m=inp.layer_level_m,
        mask=inp.layer_mask,
        rupture_kn_m=np.where(inp.layer_mask, inp.layer_rupture_kn_m, 0.0),
        pullout_kn_m2=np.where(inp.layer_mask, inp.layer_pullout_kn_m2, 0.0),
        front_kn_m=np.where(inp.layer_mask, front, 0.0),
        tangent=np.zeros(inp.layer_mask.shape, dtype=bool)
        if inp.tangent is None
        else np.broadcast_to(inp.tangent[:, None], inp.layer_mask.shape).copy(),
    )


def _front_reach_m(inp: WallSlipInput) -> FloatArray:
    """H plus the run of any toe slope (with its bench), (n,)."""
    toe = np.radians(np.clip(inp.toe_slope_deg, 0.0, 80.0))
    run = np.where(
        toe > 1e-6, BENCH_M + inp.toe_slope_height_m / np.maximum(np.tan(toe), 1e-6), 0.0
    )
    return inp.height_m + run


def wall_bounds(inp: WallSlipInput, reach: FloatArray | None = None) -> Bounds:
    """Parameter bounds of every segment's circles, scaled by H and L (those of wall_grid)."""
    h, length = inp.height_m, inp.length_m
    reach = _front_reach_m(inp) if reach is None else reach
    return Bounds(
        exit_min_m=-1.6 * reach,
        exit_max_m=np.zeros_like(h),
        entry_min_m=0.05 * np.maximum(length, 0.1 * h),
        entry_max_m=length + 3.5 * h,
    )


def wall_grid(inp: WallSlipInput, density: SearchDensity) -> tuple[FloatArray, Bounds]:
    """Grid circles (n, c, 3) and parameter bounds of every segment, scaled by H and L."""
    h, length = inp.height_m, inp.length_m
    reach = _front_reach_m(inp)
    exits = -np.asarray(density.exit_fractions)[None, :] * reach[:, None]
    entries = np.concatenate(
        [
            np.asarray(density.entry_fractions_of_length)[None, :] * length[:, None],
            length[:, None] + np.asarray(density.entry_beyond_heights)[None, :] * h[:, None],
        ],
        axis=1,
    )
    angles = np.radians(np.asarray(density.angles_deg))
    e, x, a = np.broadcast_arrays(
        exits[:, :, None, None], entries[:, None, :, None], angles[None, None, None, :]
    )
    grid = np.stack([e.reshape(inp.n, -1), x.reshape(inp.n, -1), a.reshape(inp.n, -1)], -1)
    return grid, wall_bounds(inp, reach)


def toe_slope_bearing_factors(
    toe_slope_deg: FloatArray, friction_deg: FloatArray
) -> tuple[FloatArray, FloatArray, FloatArray]:
    """Ground-inclination factors (g_c, g_gamma, g_c undrained) for a base beside a toe slope.

    Vesic (1975) [pub, in Winterkorn & Fang, Foundation Engineering Handbook ch. 3; quoted in
    Das, Principles of Foundation Engineering; values from memory]: with the ground falling at
    beta (radians) from the edge of the base, g_q = g_gamma = (1 - tan beta)^2,
    g_c = g_q - (1 - g_q) / (Nc tan phi) for phi > 0, and g_c = 1 - 2 beta / (pi + 2) for
    phi = 0. Screening applies them in full, as if the base stood at the crest: the bench in
    front of the face is ignored [cp, conservative].
    """
    beta = np.radians(np.clip(np.asarray(toe_slope_deg, dtype=np.float64), 0.0, 45.0))
    phi = np.radians(np.asarray(friction_deg, dtype=np.float64))
    g_q = (1.0 - np.tan(beta)) ** 2
    tan_phi = np.tan(phi)
    nq = np.exp(np.pi * tan_phi) * np.tan(np.pi / 4 + phi / 2) ** 2
    small = tan_phi < 1e-9
    nc_tan = np.where(small, 1.0, (nq - 1.0))  # Nc tan(phi) = Nq - 1
    g_c = np.where(small, 1.0 - 2.0 * beta / (np.pi + 2.0), g_q - (1.0 - g_q) / nc_tan)
    g_c_undrained = 1.0 - 2.0 * beta / (np.pi + 2.0)
    return np.clip(g_c, 0.0, 1.0), g_q, g_c_undrained
