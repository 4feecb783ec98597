"""Internal stability by the Simplified Method (METHOD section 5; AASHTO LRFD 11.10.6.2).

Per layer at depth z: sigma_v = gamma_r z + S + q_D + q_LL (factored EV, EV, ES, LS; S the
backslope surcharge), T_max = Kr sigma_v Sv with Kr/Ka by material [from memory, AASHTO Fig.
11.10.6.2.1-3]. Pullout P = F* alpha sigma_v' C Le Rc with sigma_v' = gamma_r z + S + q_D
(resisting factors, no live load) and C = 2 [from memory, AASHTO Eq. 11.10.6.3.2-1]. Rupture
of geosynthetics T_al = T_ult/(RF_ID RF_CR RF_D) [AASHTO 11.10.6.4.3]; of steel phi Fy A_c on
the section left after corrosion (engine/checks/corrosion.py).

Each layer gets the lightest grade of its family that carries T_max in every case and
passes pullout at the chosen L (METHOD section 5: "the lightest grade that passes"); strips
and mats of a heavier grade cover more width (Rc), so a layer short of pullout may take more
strips before the wall takes longer strips. The length search therefore asks, per layer,
for the pullout of the grade with the largest Rc among those that carry T_max. When no
grade carries T_max, the heaviest is used and rupture fails. Nothing here depends on L
except the pullout length Le, so :func:`prepare` runs once and :func:`pullout` is cheap
inside the length search.
Arrays: ``(n, c, m)`` over segments, load cases and layers; ``(n, m)`` per layer; ``(n, g)``
per grade.
"""

from __future__ import annotations

import weakref

import numpy as np

from screening.engine.arrays import GRID, STRIP, SegmentArrays
from screening.engine.checks.corrosion import (
    bar_area_mm2_per_m,
    steel_loss_per_side_mm,
    strip_area_mm2_per_m,
)
from screening.engine.context import CheckValues, Grades, InternalSetup, ScreenContext, ratio
from screening.engine.result import CDR_CAP, BoolArray, FloatArray, IntArray

KR_DEPTH_M = 6.0
"""Depth below which Kr/Ka and F* keep their deep values."""
KR_TOP = np.array([1.7, 2.5, 1.0, 1.0])
"""Kr/Ka at z = 0 by material code (strip, grid, geogrid, geotextile) [mem, AASHTO Fig. 11.10.6.2.1-3]."""
KR_DEEP = np.array([1.2, 1.2, 1.0, 1.0])
PULLOUT_C = 2.0
"""Both faces of a strip, grid or sheet [AASHTO Eq. 11.10.6.3.2-1]."""
STRIP_FSTAR_MAX = 2.0
GEOSYNTHETIC_FSTAR = 0.67
"""F* = 0.67 tan(phi_r) for geogrids and geotextiles without tests [mem, AASHTO 11.10.6.3.2]."""


def kr_over_ka(material: IntArray, depth_m: FloatArray) -> FloatArray:
    """Kr/Ka of each layer, (n, m): linear from the top value to the deep value at 6 m."""
    top = KR_TOP[material][:, None]
    deep = KR_DEEP[material][:, None]
    return top + (deep - top) * np.clip(depth_m / KR_DEPTH_M, 0.0, 1.0)


def pullout_friction(a: SegmentArrays, tan_fill: FloatArray, depth_m: FloatArray) -> FloatArray:
    """F* per case and layer, (n, c, m) [mem, AASHTO Fig. 11.10.6.3.2-2].

    Ribbed strips: 1.2 + log10(Cu) (at most 2.0) at z = 0 down to tan(phi_r) at 6 m; grids:
    20 t/St down to 10 t/St; geosynthetics 0.67 tan(phi_r). A partial factor on tan(phi)
    divides F* too: tan_fill is already the design value, the strip top value is divided here.
    """
    frac = np.clip(depth_m / KR_DEPTH_M, 0.0, 1.0)[:, None, :]
    tan_r = tan_fill[:, :, None]
    factor = (np.tan(np.radians(a.fill_friction_deg))[:, None] / tan_fill)[:, :, None]
    strip_top = np.minimum(1.2 + np.log10(np.maximum(a.fill_uniformity, 1.0)), STRIP_FSTAR_MAX)
    strip_top = strip_top[:, None, None] / factor
    strip = strip_top + (tan_r - strip_top) * frac
    t_over_st = np.nan_to_num(a.transverse_bar_mm / a.transverse_spacing_mm)[:, None, None] / factor
    grid = 20 * t_over_st + (10 * t_over_st - 20 * t_over_st) * frac
    geo = GEOSYNTHETIC_FSTAR * tan_r + 0 * frac
    mat = a.material[:, None, None]
    return np.where(mat == STRIP, strip, np.where(mat == GRID, grid, geo))


def active_length_m(a: SegmentArrays, height_m: FloatArray, depth_m: FloatArray) -> FloatArray:
    """La from the face to the line of maximum tension, (n, m) [mem, AASHTO Fig. 11.10.6.3.1-1].

    Inextensible: 0.3H above mid-height, 0.6(H - z) below. Extensible: Rankine plane through
    the toe, (H - z) tan(45 - phi_r/2).
    """
    h = height_m[:, None]
    bilinear = np.where(depth_m <= h / 2, 0.3 * h, 0.6 * (h - depth_m))
    rankine = (h - depth_m) * np.tan(np.radians(45.0 - a.fill_friction_deg / 2))[:, None]
    return np.where(a.inextensible[:, None], bilinear, rankine)


def grade_capacity_kn_m(a: SegmentArrays) -> tuple[FloatArray, FloatArray]:
    """(factored rupture capacity, coverage Rc) of every grade per metre run, (n, g) each.

    Padding (grades a family does not have) gets -inf capacity so it is never chosen.
    """
    loss = steel_loss_per_side_mm(a.zinc_um, a.design_life_years)[:, None]
    fy = a.yield_strength_mpa[:, None]
    strip = (
        fy
        * strip_area_mm2_per_m(a.grade_elements_per_m, a.grade_width_mm, a.grade_thickness_mm, loss)
        / 1000
    )
    grid = fy * bar_area_mm2_per_m(a.grade_bars_per_m, a.grade_bar_diameter_mm, loss) / 1000
    coverage = np.nan_to_num(a.grade_coverage, nan=1.0)
    geo = a.grade_ult_kn_m / a.rf_total[:, None] * coverage
    mat = a.material[:, None]
    nominal = np.where(mat == STRIP, strip, np.where(mat == GRID, grid, geo))
    g = a.grade_ult_kn_m.shape[1]
    real = np.arange(g)[None, :] < a.grade_count[:, None]
    capacity = np.where(real, np.nan_to_num(nominal, nan=0.0) * a.phi_rupture[:, None], -np.inf)
    strip_rc = a.grade_elements_per_m * a.grade_width_mm / 1000
    rc = np.where(mat == STRIP, np.where(np.isnan(strip_rc), coverage, strip_rc), coverage)
    return capacity, rc


def _grades(s_capacity, s_coverage, index, passes, mask) -> Grades:
    return Grades(
        index=index.astype(np.int64),
        passes_rupture=passes & mask,
        rupture_capacity=np.where(mask, np.take_along_axis(s_capacity, index, axis=1), 0.0),
        coverage=np.where(mask, np.take_along_axis(s_coverage, index, axis=1), 0.0),
    )


def prepare(ctx: ScreenContext) -> InternalSetup:
    a, cs, g = ctx.a, ctx.cases, ctx.geom
    z, mask = g.layer_depth_m, g.layer_mask
    gamma_z = (a.fill_unit_weight_kn_m3[:, None] * z + ctx.slope_surcharge_kpa[:, None])[:, None, :]
    q_d = a.surcharge_kpa[:, None, None]
    q_l = ctx.live_kpa[:, None, None]
    sigma = cs.ev[None, :, None] * gamma_z + cs.es[None, :, None] * q_d + cs.ls[None, :, None] * q_l
    sigma_eff = cs.ev_resisting[None, :, None] * gamma_z + cs.es_resisting[None, :, None] * q_d
    kr = ctx.ka_fill[:, :, None] * kr_over_ka(a.material, z)[:, None, :]
    tension = np.where(mask[:, None, :], kr * sigma * a.spacing_m[:, None, None], 0.0)

    uses = cs.uses("rupture")
    pick = uses if uses.any() else np.ones_like(uses)
    t_design = np.where(pick[None, :, None], tension, -np.inf).max(axis=1)
    capacity, rc = grade_capacity_kn_m(a)
    ok = capacity[:, None, :] >= t_design[:, :, None] * (1 - 1e-12)
    passes = ok.any(axis=2)
    best_rc = np.where(ok, rc[:, None, :], -np.inf)
    best = np.where(passes, np.argmax(best_rc, axis=2), (a.grade_count - 1)[:, None])
    fstar = pullout_friction(a, ctx.tan_fill, z)
    unit = a.phi_pullout * fstar * a.alpha[:, None, None] * sigma_eff * PULLOUT_C
    return InternalSetup(
        tension=tension,
        tension_design=np.where(mask, t_design, 0.0),
        grade_capacity=capacity,
        grade_coverage=rc,
        rupture_ok=ok,
        best=_grades(capacity, rc, best, passes, mask),
        pullout_unit=unit,
        active_length=np.where(mask, active_length_m(a, g.design_height_m, z), 0.0),
        mask=mask,
    )


_LAST_GRADES: list[tuple | None] = [None]
"""The last choose_grades: (context, setup (weak references), L as bytes, result). Pullout,
the slip input and the seismic checks each ask for the same context and L in turn."""


def choose_grades(ctx: ScreenContext, s: InternalSetup, length_m: FloatArray) -> Grades:
    """Per layer, the lightest grade that carries T_max and passes pullout at L.

    When no grade passes both, the grade with the most pullout among those that carry T_max
    (and the heaviest when none carries it) is kept, and its check fails. The result is
    shared with the caller that asked last for the same (frozen) context, setup and L.
    """
    key = (np.asarray(length_m).dtype.str, np.asarray(length_m).tobytes())
    last = _LAST_GRADES[0]
    if last is not None and last[0]() is ctx and last[1]() is s and last[2] == key:
        return last[3]
    grades = _choose_grades(ctx, s, length_m)
    _LAST_GRADES[0] = (weakref.ref(ctx), weakref.ref(s), key, grades)
    return grades


def _choose_grades(ctx: ScreenContext, s: InternalSetup, length_m: FloatArray) -> Grades:
    le = np.maximum(length_m[:, None] - s.active_length, 0.0)
    uses = ctx.cases.uses("pullout")
    pick = uses if uses.any() else np.ones_like(uses)
    with np.errstate(divide="ignore", invalid="ignore"):
        need = s.tension / (s.pullout_unit * le[:, None, :])
    need = np.where(pick[None, :, None], np.nan_to_num(need, nan=0.0, posinf=np.inf), 0.0).max(
        axis=1
    )
    if not uses.any():
        need = np.zeros_like(need)
    ok = s.rupture_ok & (s.grade_coverage[:, None, :] >= need[:, :, None] * (1 - 1e-12))
    found = ok.any(axis=2)
    index = np.where(found, np.argmax(ok, axis=2), s.best.index)
    if ctx.grade_boost is not None:
        index = np.minimum(index + ctx.grade_boost[:, None], (ctx.a.grade_count - 1)[:, None])
    return _grades(s.grade_capacity, s.grade_coverage, index, s.rupture_ok.any(axis=2), s.mask)


def _worst_layer(cdr: FloatArray, mask: BoolArray, uses: BoolArray) -> tuple[IntArray, IntArray]:
    """(case, layer) of the smallest CDR over listed cases and real layers; cdr is (n, c, m)."""
    n, c, m = cdr.shape
    masked = np.where(mask[:, None, :] & uses[None, :, None], cdr, np.inf).reshape(n, c * m)
    flat = np.argmin(masked, axis=1)
    return flat // m, flat % m


def _layer_words(ctx: ScreenContext, layer: IntArray) -> list[str]:
    depth = np.take_along_axis(ctx.geom.layer_depth_m, layer[:, None], axis=1)[:, 0]
    return [
        f"layer {k + 1} at {d:.2f} m" for k, d in zip(layer.tolist(), depth.tolist(), strict=True)
    ]


def pullout_layers(
    ctx: ScreenContext, s: InternalSetup, grades: Grades, length_m: FloatArray
) -> tuple[FloatArray, FloatArray]:
    """(factored capacity, CDR = capacity / T_max) per case and layer at L with ``grades``,
    (n, c, m) each. The minimum anchorage Le >= Rules.min_anchorage_m is a detailing rule
    that sizing meets (:func:`screening.engine.sizing.anchorage_minimum_m`), not a margin."""
    le = length_m[:, None] - s.active_length
    capacity = s.pullout_unit * (grades.coverage * np.maximum(le, 0.0))[:, None, :]
    return capacity, ratio(capacity, s.tension)


def pullout(
    ctx: ScreenContext,
    s: InternalSetup,
    length_m: FloatArray,
    grades: Grades | None = None,
    detail: bool = True,
) -> CheckValues:
    """Worst layer and case for pullout at L (demand T_max, capacity phi P, kN/m).

    ``grades`` None: each layer's best grade for pullout (what the length search needs).
    """
    grades = s.best if grades is None else grades
    capacity, cdr = pullout_layers(ctx, s, grades, length_m)
    uses = ctx.cases.uses("pullout")
    return _reduce(ctx, s, grades, "pullout", capacity, cdr, uses, detail, length_m)


def rupture(
    ctx: ScreenContext, s: InternalSetup, grades: Grades, detail: bool = True
) -> CheckValues:
    """Worst layer and case for rupture of the chosen grades (kN/m)."""
    capacity = np.broadcast_to(grades.rupture_capacity[:, None, :], s.tension.shape)
    cdr = ratio(capacity, s.tension)
    uses = ctx.cases.uses("rupture")
    return _reduce(ctx, s, grades, "rupture", capacity, cdr, uses, detail, None)


def _reduce(ctx, s, grades, check, capacity, cdr, uses, detail, length_m) -> CheckValues:
    demand = s.tension
    n = ctx.n
    if not uses.any():
        zero = np.zeros(n)
        return CheckValues(zero, zero, np.full(n, CDR_CAP), np.full(n, -1), None)
    case, layer = _worst_layer(cdr, s.mask, uses)
    rows = np.arange(n)
    out = CheckValues(
        demand=demand[rows, case, layer],
        capacity=capacity[rows, case, layer],
        cdr=cdr[rows, case, layer],
        case=case.astype(np.int64),
    )
    if not detail:
        return out
    words = _layer_words(ctx, layer)
    if check == "pullout":
        le = length_m - s.active_length[rows, layer]
        short = le < ctx.a.rules.min_anchorage_m - 1e-9
        for i in np.flatnonzero(short).tolist():
            words[i] += f", Le {le[i]:.2f} m < {ctx.a.rules.min_anchorage_m:.2f} m"
    else:
        grade = grades.index[rows, layer].tolist()
        fails = ~grades.passes_rupture[rows, layer]
        names = ctx.a.grade_names
        words = [
            f"{w}, {names[i][k]}" + (" (heaviest grade, none strong enough)" if f else "")
            for i, (w, k, f) in enumerate(zip(words, grade, fails.tolist(), strict=True))
        ]
    return CheckValues(out.demand, out.capacity, out.cdr, out.case, words)


def nominal_layer_strengths(ctx: ScreenContext, length_m: FloatArray) -> dict[str, FloatArray]:
    """Unfactored strengths of the layers at L with the grades screening chooses there.

    For checks added later (compound slip circles): ``level_m`` height of each layer above the
    base, ``rupture_kn_m`` long-term tensile strength per metre run (no resistance factor),
    ``pullout_kn_m2`` pullout resistance per metre of embedded length per metre run
    (F* alpha sigma_v' C Rc with unfactored soil weight and strength, no live load),
    ``mask``; all (n, m).
    """
    s = ctx.internal if ctx.internal is not None else prepare(ctx)
    a, g = ctx.a, ctx.geom
    grades = choose_grades(ctx, s, length_m)
    z = g.layer_depth_m
    tan_r = np.tan(np.radians(a.fill_friction_deg))[:, None]
    fstar = pullout_friction(a, tan_r, z)[:, 0, :]
    sigma = (
        a.fill_unit_weight_kn_m3[:, None] * z
        + ctx.slope_surcharge_kpa[:, None]
        + a.surcharge_kpa[:, None]
    )
    with np.errstate(divide="ignore", invalid="ignore"):
        rupture_nominal = grades.rupture_capacity / a.phi_rupture[:, None]
    mask = g.layer_mask
    return {
        "level_m": np.where(mask, g.design_height_m[:, None] - z, 0.0),
        "rupture_kn_m": np.where(mask, np.nan_to_num(rupture_nominal), 0.0),
        "pullout_kn_m2": np.where(
            mask, fstar * a.alpha[:, None] * sigma * PULLOUT_C * grades.coverage, 0.0
        ),
        "mask": mask,
    }
