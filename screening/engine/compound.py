"""Compound and global stability of MSE wall segments (METHOD section 6), vectorised.

Builds each segment's cross-section (wall face, embedment, a toe slope in front with a bench,
a backslope behind, the three soils and the reinforcement layers), runs the slip-circle
search of :mod:`screening.engine.slip_search` under the factor set, and reports per segment
the critical compound and global circles with their capacity/demand ratio:

- ``lrfd``: Service I loads (all factors 1.0) and CDR = F * phi, phi = resistance
  ``compound`` (``compound_abutment`` under abutments) [mem, AASHTO LRFD 11.6.3.7: overall
  stability at the service limit state, phi 0.65 where the slope supports a structure].
- ``asd``: unfactored loads and CDR = F / FS_required = F * resistance [mem, FHWA-NHI-00-043:
  1.3, 1.5 under abutments].
- ``partial-factor`` (EN 1997-1 DA1, BS 8006-1): every case that lists ``compound`` divides
  tan(phi'), c' and cu by its partial factors and multiplies soil weight, permanent and live
  surcharge by ev, es and ls [pub clause EN 1997-1 2.4.7.3.4.2 / 11.5.1; values in the preset];
  CDR = F * resistance (R1 = 1.0; BS 8006 1/f_n). The worst case governs.

A foundation with an undrained strength cu is checked twice, short term (cu, phi = 0, total
stress) and long term (c', phi' with the water table); the worse governs [cp].

Geometry assumptions for screening [cp]: a 1.2 m bench in front of the face before a toe
slope [mem, AASHTO C11.10.2.2: at least 4 ft in front of walls on slopes]; a toe slope falls
one design height unless told otherwise; a backslope rises without a break; surcharge acts on
the ground behind the face; the facing holds the front end of each layer (its connection is
taken as strong as the layer) unless told otherwise.
"""

from __future__ import annotations

from dataclasses import dataclass, fields, replace

import numpy as np

from screening.engine.result import CDR_CAP, BoolArray, FloatArray
from screening.engine.slip_geometry import (
    Circles,
    SlipLayers,
    SlipSection,
    SlipSoils,
    make_slices,
)
from screening.engine.slip_search import (
    STANDARD,
    Bounds,
    CriticalCircle,
    SearchDensity,
    search,
)

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

    @property
    def n(self) -> int:
        return int(self.height_m.shape[0])

    def take(self, rows: np.ndarray) -> WallSlipInput:
        """The same input for a subset of segments."""
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


@dataclass(frozen=True)
class FamilyCheck:
    """One family (compound or global) per segment, governing case; (n,) arrays."""

    demand: FloatArray
    """Driving moment of the critical circle, kN.m/m (with the case's load factors)."""
    capacity: FloatArray
    """Factored resisting moment = CDR * demand, kN.m/m."""
    cdr: FloatArray
    factor: FloatArray
    """Bishop F of the critical circle (strengths divided by the case's partial factors)."""
    case: list[str]
    centre_x_m: FloatArray
    centre_y_m: FloatArray
    radius_m: FloatArray
    converged: BoolArray
    found: BoolArray


@dataclass(frozen=True)
class CompoundResult:
    compound: FamilyCheck
    global_: FamilyCheck


def factor_cases(method: str, cases) -> list[Factors]:
    """The slip-search cases of a factor set (see the module docstring).

    ``cases`` is a sequence of objects with the LoadCase fields (model or CaseArrays rows).
    """
    if method in ("lrfd", "asd"):
        return [Factors("Service I" if method == "lrfd" else "Service (unfactored)")]
    out = []
    for c in cases:
        if "compound" not in getattr(c, "checks", ("compound",)):
            continue
        out.append(Factors(c.name, c.ev, c.es, c.ls, c.tan_phi, c.cohesion, c.undrained))
    return out or [Factors("unfactored")]


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
    )


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
    )


def wall_grid(inp: WallSlipInput, density: SearchDensity) -> tuple[FloatArray, Bounds]:
    """Grid circles (n, c, 3) and parameter bounds of every segment, scaled by H and L."""
    h, length = inp.height_m, inp.length_m
    toe = np.radians(np.clip(inp.toe_slope_deg, 0.0, 80.0))
    run = np.where(
        toe > 1e-6, BENCH_M + inp.toe_slope_height_m / np.maximum(np.tan(toe), 1e-6), 0.0
    )
    reach = h + run
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
    bounds = Bounds(
        exit_min_m=-1.6 * reach,
        exit_max_m=np.zeros_like(h),
        entry_min_m=0.05 * np.maximum(length, 0.1 * h),
        entry_max_m=length + 3.5 * h,
    )
    return grid, bounds


def _driving_moment(section, soils, circ: CriticalCircle, density, kh) -> FloatArray:
    """Driving moment (kN.m/m) of each segment's critical circle, with any pseudo-static part."""
    col = lambda a, fill: np.nan_to_num(a, nan=fill)[:, None]  # noqa: E731
    circles = Circles(
        col(circ.x_exit_m, -1.0),
        col(circ.x_entry_m, 1.0),
        col(circ.x_exit_m, 0.0),
        col(circ.x_entry_m, 0.0),
        col(circ.centre_x_m, 0.0),
        col(circ.centre_y_m, 10.0),
        col(circ.radius_m, 10.0),
        circ.found[:, None],
    )
    sl = make_slices(section, soils, circles, density.slices)
    drive = circles.radius_m * np.sum(sl.weight_kn * sl.sin_a, axis=-1)
    lever = circles.centre_y_m[..., None] - 0.5 * (sl.base_y_m + sl.top_y_m)
    drive = drive + kh[:, None] * np.sum(sl.weight_kn * lever, axis=-1)
    return np.where(circ.found, drive[:, 0], 0.0)


def compound_check(
    inp: WallSlipInput,
    method: str,
    resistance: dict[str, float],
    cases=(),
    density: SearchDensity = STANDARD,
    kh: FloatArray | None = None,
) -> CompoundResult:
    """Critical compound and global circles of every segment with their CDR.

    ``resistance`` needs ``compound`` (and ``compound_abutment``, defaulting to it);
    ``cases`` the factor set's load cases (used by partial-factor sets); ``kh`` an optional
    pseudo-static horizontal coefficient per segment (n,).
    """
    n = inp.n
    phi = np.where(
        inp.abutment,
        resistance.get("compound_abutment", resistance["compound"]),
        resistance["compound"],
    )
    layers = wall_layers(inp)
    drained_rows = np.arange(n)
    undrained_rows = np.flatnonzero(np.isfinite(inp.found_undrained_kpa))
    best = {name: _empty(n) for name in ("compound", "global")}
    for f in factor_cases(method, cases):
        for undrained, rows in ((False, drained_rows), (True, undrained_rows)):
            if rows.size == 0:
                continue
            sub = inp.take(rows)
            section = wall_section(sub, f)
            if undrained:
                section = replace(section, water_level_m=np.full(rows.size, -np.inf))
            soils = wall_soils(sub, f, undrained)
            grid, bounds = wall_grid(sub, density)
            sub_layers = SlipLayers(*(getattr(layers, k.name)[rows] for k in fields(SlipLayers)))
            sub_kh = np.zeros(rows.size) if kh is None else np.asarray(kh, dtype=np.float64)[rows]
            found = search(
                section,
                soils,
                sub_layers,
                grid,
                bounds,
                density,
                sub_kh,
                start_groups=len(density.exit_fractions),
            )
            label = f"{f.name}, {'short term (cu)' if undrained else 'long term'}"
            if not np.isfinite(inp.found_undrained_kpa).any():
                label = f.name
            for name in best:
                circ = found.family(name)
                drive = _driving_moment(section, soils, circ, density, sub_kh)
                _merge(best[name], rows, circ, phi[rows], label, drive)
    return CompoundResult(_finish(best["compound"]), _finish(best["global"]))


def _empty(n: int) -> dict:
    return {
        "cdr": np.full(n, np.inf),
        "factor": np.full(n, np.inf),
        "demand": np.zeros(n),
        "case": np.full(n, "", dtype=object),
        "centre_x_m": np.full(n, np.nan),
        "centre_y_m": np.full(n, np.nan),
        "radius_m": np.full(n, np.nan),
        "converged": np.ones(n, dtype=bool),
        "found": np.zeros(n, dtype=bool),
    }


def _merge(acc: dict, rows, circ: CriticalCircle, phi, label: str, drive) -> None:
    cdr = circ.factor * phi
    worse = cdr < acc["cdr"][rows]
    idx = rows[worse]
    acc["cdr"][idx] = cdr[worse]
    acc["factor"][idx] = circ.factor[worse]
    acc["demand"][idx] = drive[worse]
    for key in ("centre_x_m", "centre_y_m", "radius_m", "converged", "found"):
        acc[key][idx] = getattr(circ, key)[worse]
    acc["case"][idx] = label


def _finish(acc: dict) -> FamilyCheck:
    cdr = np.clip(np.where(np.isfinite(acc["cdr"]), acc["cdr"], CDR_CAP), 0.0, CDR_CAP)
    demand = np.clip(acc["demand"], 0.0, None)
    return FamilyCheck(
        demand=demand,
        capacity=cdr * demand,
        cdr=cdr,
        factor=acc["factor"],
        case=acc["case"].tolist(),
        centre_x_m=acc["centre_x_m"],
        centre_y_m=acc["centre_y_m"],
        radius_m=acc["radius_m"],
        converged=acc["converged"],
        found=acc["found"],
    )
