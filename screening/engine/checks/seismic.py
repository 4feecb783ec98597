"""Seismic screening of MSE walls: Mononobe-Okabe and the AASHTO approach (METHOD section 3).

- Mononobe-Okabe [pub, Okabe 1926, Mononobe & Matsuo 1929; the form of AASHTO LRFD Eq.
  A11.1.1.1-2 and Kramer 1996 Eq. 11.xx, from memory]:
  K_AE = cos^2(phi - theta - psi) / (cos psi cos^2 theta cos(delta + theta + psi)
         [1 + sqrt(sin(phi + delta) sin(phi - beta - psi) / (cos(delta + theta + psi) cos(beta - theta)))]^2)
  with psi = atan(kh / (1 - kv)); it has no solution when phi - psi - beta < 0: the backfill
  itself is not stable under that shaking, and the segment goes to full design.
- Site to wall coefficient [mem, AASHTO LRFD 11.10.7.1 / FHWA GEC 11 ch. 7]: kh = 0.5 kh0 where
  25-50 mm of movement is acceptable, else kh = kh0. Screening takes walls as able to move
  (MSE walls are flexible) and abutments as not [cp]; kv = 0.
- External forces [mem, AASHTO 11.10.7.1]: the total thrust P_AE = 0.5 gamma_b h^2 K_AE
  (delta = beta, h = H + L tan beta) plus half the inertia of the reinforced mass,
  0.5 P_IR with P_IR = kh gamma_r H (0.5 H) (and the slope over that width). The static part of
  P_AE acts at h/3 and the seismic increment at 0.6h [mem, Seed & Whitman 1970]; P_IR at
  mid-height.
- Internal [mem, AASHTO 11.10.7.2]: the inertial force of the active zone P_I = kh W_A is
  shared between the layers in proportion to their resistant length Le; each layer carries
  T_max (static, unfactored) + T_md against rupture and against pullout with F* at 80 %.
- Extreme Event I [mem, AASHTO Tables 3.4.1-1 and 11.5.8-1]: load factors 1.0 (EQ, EV, EH,
  ES), live load gamma_EQ = 0.5 where it drives; resistance factors sliding 1.0, bearing 1.0,
  pullout 1.2, rupture of steel strips 1.0, of steel grids 0.85, of geosynthetics 1.2;
  resultant within 0.4L on soil (0.45L on rock); overall (compound and global) stability by
  the slip search with a pseudo-static kh on every slice, phi 0.9. Allowable stress: every required FS at 75 %
  of its static value [mem, FHWA-NHI-00-043]. Partial-factor sets: all factors 1.0 (the
  accidental design situation of EN 1997-1 Annex A) [mem].
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np

from screening.engine.arrays import GEOGRID, GEOTEXTILE, GRID, STRIP
from screening.engine.checks import internal
from screening.engine.checks.external import UNDRAINED_NC, water_factor
from screening.engine.checks.pressure import (
    coulomb_ka,
    mononobe_okabe_kae,
    mononobe_okabe_valid,
    rankine_ka,
    seismic_angle_deg,
    vesic_factors,
)
from screening.engine.context import ExtraCheck, ScreenContext, cdr_range
from screening.engine.result import CDR_CAP, BoolArray, FloatArray
from screening.engine.slip.wall import toe_slope_bearing_factors

LIVE_LOAD_FACTOR_EQ = 0.5
"""gamma_EQ on live load in Extreme Event I [mem, AASHTO C3.4.1]."""
PULLOUT_FSTAR_SEISMIC = 0.8
"""F* reduced to 80 % of its static value under seismic loading [mem, AASHTO 11.10.7.2]."""
EXTREME_RESISTANCE = {"sliding": 1.0, "bearing": 1.0, "pullout": 1.2}
EXTREME_RUPTURE = {STRIP: 1.0, GRID: 0.85, GEOGRID: 1.2, GEOTEXTILE: 1.2}
EXTREME_ECCENTRICITY = (0.4, 0.45)
"""e/L limits (soil, rock) in Extreme Event I [mem, AASHTO 11.6.5.1]."""
ASD_SEISMIC_RATIO = 0.75
"""Seismic FS required = 75 % of the static FS [mem, FHWA-NHI-00-043]."""
EXTREME_OVERALL = 0.9
"""Resistance factor of overall (compound and global) stability in Extreme Event I
[mem, AASHTO LRFD 11.6.5]."""


def wall_kh(kh0: FloatArray, movement_acceptable: BoolArray) -> FloatArray:
    """kh = 0.5 kh0 where 25-50 mm movement is acceptable, else kh0 [mem, AASHTO 11.10.7.1]."""
    return np.where(movement_acceptable, 0.5, 1.0) * np.asarray(kh0, dtype=np.float64)


def active_zone_area_m2(
    height_m: FloatArray, inextensible: BoolArray, fill_friction_deg
) -> FloatArray:
    """Area of the active zone per metre run: bilinear 0.3H wide over the top half and tapering
    to the toe (0.225 H^2), or the Rankine wedge 0.5 H^2 tan(45 - phi/2) [mem, AASHTO Fig.
    11.10.6.3.1-1]."""
    h = np.asarray(height_m, dtype=np.float64)
    wedge = 0.5 * h**2 * np.tan(np.radians(45.0 - np.asarray(fill_friction_deg) / 2.0))
    return np.where(inextensible, 0.3 * h * 0.5 * h + 0.5 * 0.3 * h * 0.5 * h, wedge)


def share_by_resistant_length(
    force_kn_m: FloatArray, le_m: FloatArray, mask: BoolArray
) -> FloatArray:
    """T_md per layer, (n, m): ``force`` (n,) shared in proportion to each layer's Le."""
    le = np.where(mask, np.clip(le_m, 0.0, None), 0.0)
    total = le.sum(axis=1, keepdims=True)
    share = np.where(total > 0, le / np.where(total > 0, total, 1.0), 0.0)
    return np.asarray(force_kn_m)[:, None] * share


def _resistances(ctx: ScreenContext) -> dict[str, FloatArray]:
    """Extreme-event resistance factors and e/L limit per segment, by the factor set's method."""
    a = ctx.a
    n = ctx.n
    rock = a.found_rock
    if a.method == "asd":
        scale = 1.0 / ASD_SEISMIC_RATIO
        return {
            "sliding": np.full(n, a.phi_sliding * scale),
            "bearing": np.full(n, a.phi_bearing * scale),
            "pullout": np.full(n, a.phi_pullout * scale),
            "rupture": a.phi_rupture * scale,
            # e <= L/4 on soil, L/3 on rock under seismic loading [mem, FHWA-NHI-00-043].
            "eccentricity": np.where(rock, 1.0 / 3.0, 0.25),
        }
    if a.method == "lrfd":
        rupture = np.array([EXTREME_RUPTURE[k] for k in range(4)])[a.material]
        return {
            "sliding": np.full(n, EXTREME_RESISTANCE["sliding"]),
            "bearing": np.full(n, EXTREME_RESISTANCE["bearing"]),
            "pullout": np.full(n, EXTREME_RESISTANCE["pullout"]),
            "rupture": rupture,
            "eccentricity": np.where(rock, EXTREME_ECCENTRICITY[1], EXTREME_ECCENTRICITY[0]),
        }
    return {
        "sliding": np.ones(n),
        "bearing": np.ones(n),
        "pullout": np.ones(n),
        "rupture": np.ones(n),
        "eccentricity": np.maximum(a.eccentricity_limit, 1.0 / 3.0),
    }


SUBCHECKS = ("sliding", "eccentricity", "bearing", "pullout", "rupture", "overall")
UNITS = {
    "sliding": "kN/m",
    "eccentricity": "m",
    "bearing": "kPa",
    "pullout": "kN/m",
    "rupture": "kN/m",
    "overall": "kN·m/m",
}


def seismic_checks(ctx: ScreenContext, length_m: FloatArray) -> dict[str, tuple]:
    """Extreme Event I checks at L: {sub-check: (demand, capacity, cdr)}, each (n,), plus
    ``"kh"`` (n,) and ``"valid"`` (n,) (M-O has a solution). Segments with kh0 = 0 get CDR_CAP
    (and nothing is computed for them: sizing asks for this check at every trial length)."""
    n = ctx.n
    length = np.asarray(length_m, dtype=np.float64)
    rows = np.flatnonzero(ctx.a.seismic_kh > 0)
    if rows.size == n:
        return _shaking_checks(ctx, length)
    out: dict[str, tuple] = {
        key: (np.zeros(n), np.zeros(n), np.full(n, CDR_CAP)) for key in SUBCHECKS
    }
    valid = np.ones(n, dtype=bool)
    if rows.size:
        sub = _shaking_checks(ctx.take(rows), length[rows])
        for key in SUBCHECKS:
            for whole, part in zip(out[key], sub[key], strict=True):
                whole[rows] = part
        valid[rows] = sub["valid"]
    out["kh"] = wall_kh(ctx.a.seismic_kh, ~ctx.a.abutment)
    out["valid"] = valid
    return out


def _shaking_checks(ctx: ScreenContext, length_m: FloatArray) -> dict[str, tuple]:
    """:func:`seismic_checks` of a context whose segments all have kh0 > 0."""
    a, g = ctx.a, ctx.geom
    n = ctx.n
    big_h = g.design_height_m
    length = np.asarray(length_m, dtype=np.float64)
    kh = wall_kh(a.seismic_kh, ~a.abutment)
    beta = a.backslope_deg
    tan_b, cos_b, sin_b = (f(np.radians(beta)) for f in (np.tan, np.cos, np.sin))
    gamma_r, gamma_b = a.fill_unit_weight_kn_m3, a.retained_unit_weight_kn_m3
    q_d, q_l = a.surcharge_kpa, LIVE_LOAD_FACTOR_EQ * ctx.live_kpa
    valid = mononobe_okabe_valid(a.retained_friction_deg, beta, kh)
    kae = np.nan_to_num(mononobe_okabe_kae(a.retained_friction_deg, beta, beta, kh), nan=1.0)
    ka = coulomb_ka(a.retained_friction_deg, beta, beta)

    # External: the block with P_AE (static part at h/3, increment at 0.6h) and 0.5 P_IR.
    h = big_h + length * tan_b
    p_static = 0.5 * ka * gamma_b * h**2
    p_ae = np.maximum(0.5 * kae * gamma_b * h**2, p_static)
    p_q = ka * (q_d + q_l) * h
    w_block = gamma_r * big_h * length
    w_slope = 0.5 * gamma_r * length**2 * tan_b
    half = np.minimum(0.5 * big_h, length)
    p_ir = kh * (gamma_r * big_h * half + 0.5 * gamma_b * half**2 * tan_b)
    horizontal = cos_b * (p_ae + p_q) + 0.5 * p_ir
    vertical = w_block + w_slope + q_d * length + sin_b * (p_ae + p_q)
    m_over = cos_b * (p_static * h / 3 + (p_ae - p_static) * 0.6 * h + p_q * h / 2)
    m_over = m_over + 0.5 * p_ir * big_h / 2
    m_res = w_block * length / 2 + w_slope * 2 * length / 3 + q_d * length**2 / 2
    m_res = m_res + sin_b * (p_ae + p_q) * length
    phi = _resistances(ctx)

    tan_base = np.tan(np.radians(np.minimum(a.fill_friction_deg, a.found_friction_deg)))
    drained = vertical * tan_base
    cu = a.found_undrained_kpa
    slide_cap = phi["sliding"] * np.where(np.isnan(cu), drained, np.fmin(drained, cu * length))
    e = length / 2 - (m_res - m_over) / np.maximum(vertical, 1e-9)
    e_cap = phi["eccentricity"] * length
    v_bear = vertical + q_l * length
    e_bear = length / 2 - (m_res + q_l * length**2 / 2 - m_over) / np.maximum(v_bear, 1e-9)
    width = np.maximum(length - 2 * np.abs(e_bear), 0.01 * length)
    nc, _, ngamma = vesic_factors(a.found_friction_deg)
    cw = water_factor(a.found_water_depth_m, width)
    # Toe slope in front: the same Vesic (1975) ground-inclination factors as static bearing.
    g_c, g_gamma, g_cu = toe_slope_bearing_factors(a.toe_slope_deg, a.found_friction_deg)
    q_n = (
        a.found_cohesion_kpa * nc * g_c
        + 0.5 * a.found_unit_weight_kn_m3 * width * ngamma * cw * g_gamma
    )
    q_n = np.where(np.isnan(cu), q_n, np.fmin(q_n, UNDRAINED_NC * cu * g_cu))
    sigma = v_bear / width

    # Internal: static T_max (load factors 1.0) plus the share of kh W_A by resistant length.
    s = ctx.internal
    z, mask = g.layer_depth_m, g.layer_mask
    sigma_v = gamma_r[:, None] * z + ctx.slope_surcharge_kpa[:, None] + q_d[:, None] + q_l[:, None]
    kr = rankine_ka(a.fill_friction_deg)[:, None] * internal.kr_over_ka(a.material, z)
    t_static = np.where(mask, kr * sigma_v * a.spacing_m[:, None], 0.0)
    le = np.where(mask, np.maximum(length[:, None] - s.active_length, 0.0), 0.0)
    area = active_zone_area_m2(big_h, a.inextensible, a.fill_friction_deg)
    t_total = t_static + share_by_resistant_length(kh * gamma_r * area, le, mask)
    grades = internal.choose_grades(ctx, s, length)
    rupture_nominal = (
        grades.rupture_capacity / np.where(a.phi_rupture > 0, a.phi_rupture, 1.0)[:, None]
    )
    uses = ctx.cases.uses("pullout")
    unit = np.where(
        (uses if uses.any() else np.ones_like(uses))[None, :, None], s.pullout_unit, np.inf
    )
    unit_nominal = unit.min(axis=1) / max(a.phi_pullout, 1e-9)
    pull_cap = phi["pullout"][:, None] * PULLOUT_FSTAR_SEISMIC * unit_nominal * grades.coverage * le
    rup_cap = phi["rupture"][:, None] * rupture_nominal

    def worst_layer(cap: FloatArray) -> tuple:
        with np.errstate(divide="ignore", invalid="ignore"):
            r = np.where(mask & (t_total > 0), cap / np.where(t_total > 0, t_total, 1.0), np.inf)
        j = np.argmin(r, axis=1)
        rows = np.arange(n)
        return t_total[rows, j], cap[rows, j], r[rows, j]

    def ratio(cap, dem):
        with np.errstate(divide="ignore", invalid="ignore"):
            return np.where(dem > 1e-12, cap / np.where(dem > 1e-12, dem, 1.0), CDR_CAP)

    out = {
        "sliding": (horizontal, slide_cap, ratio(slide_cap, horizontal)),
        "eccentricity": (e, e_cap, np.where(e > 0, ratio(e_cap, e), CDR_CAP)),
        "bearing": (sigma, phi["bearing"] * q_n, ratio(phi["bearing"] * q_n, sigma)),
        "pullout": worst_layer(pull_cap),
        "rupture": worst_layer(rup_cap),
    }
    out["overall"] = overall_stability(ctx, length)
    for key, (dem, cap, cdr) in out.items():
        cdr = cdr_range(cdr)
        out[key] = (dem, cap, np.where(valid, cdr, 0.0))
    out["kh"] = kh
    out["valid"] = valid
    return out


def _overall_run(ctx: ScreenContext, length_m, todo, warm):
    """Pseudo-static slip search of rows ``todo``: kh on every slice, live load x gamma_EQ,
    unfactored soil strengths, the extreme-event resistance factor."""
    from screening.engine.slip.check import compound_check
    from screening.engine.slip.compound import slip_input
    from screening.engine.slip.density import STANDARD
    from screening.engine.slip.wall import Factors

    a = ctx.a
    inp = slip_input(ctx, length_m).take(todo)
    inp = replace(inp, live_kpa=LIVE_LOAD_FACTOR_EQ * inp.live_kpa)
    kh = wall_kh(a.seismic_kh, ~a.abutment)[todo]
    if a.method == "lrfd":
        phi = {"compound": EXTREME_OVERALL}
    elif a.method == "asd":
        phi = {
            "compound": a.resistance["compound"] / ASD_SEISMIC_RATIO,
            "compound_abutment": a.resistance.get("compound_abutment", a.resistance["compound"])
            / ASD_SEISMIC_RATIO,
        }
    else:
        phi = {"compound": 1.0}
    cases = [Factors("Extreme Event I")]
    return compound_check(inp, "partial-factor", phi, cases, STANDARD, kh=kh, warm=warm)


def overall_stability(ctx: ScreenContext, length_m: FloatArray) -> tuple:
    """(demand, capacity, cdr) of the pseudo-static compound/global search, (n,); only the
    segments with shaking are searched (the others get CDR_CAP)."""
    from screening.engine.slip.compound import shared_search

    n = ctx.n
    demand, capacity, cdr = np.zeros(n), np.zeros(n), np.full(n, CDR_CAP)
    rows = np.flatnonzero(ctx.a.seismic_kh > 0)
    if rows.size:
        v = shared_search(ctx.take(rows), np.asarray(length_m)[rows], "seismic", _overall_run)
        pick = v["global_cdr"] < v["compound_cdr"]
        for name, target in (("demand", demand), ("capacity", capacity), ("cdr", cdr)):
            target[rows] = np.where(pick, v[f"global_{name}"], v[f"compound_{name}"])
        stuck = ~(v["compound_converged"] & v["global_converged"])
        cdr[rows[stuck]] = 0.0
    return demand, capacity, cdr


def _governing(checks: dict[str, tuple]) -> tuple:
    """(demand, capacity, cdr, index into SUBCHECKS) of the sub-check with the least CDR."""
    table = np.stack([checks[k][2] for k in SUBCHECKS], axis=1)
    low = np.argmin(table, axis=1)
    rows = np.arange(table.shape[0])
    demand = np.stack([checks[k][0] for k in SUBCHECKS], axis=1)[rows, low]
    capacity = np.stack([checks[k][1] for k in SUBCHECKS], axis=1)[rows, low]
    return demand, capacity, table[rows, low], low


def seismic_ratios(ctx: ScreenContext, length_m: FloatArray) -> tuple:
    """(demand, capacity, cdr) of :func:`evaluate_seismic`, without its words (sizing)."""
    return _governing(seismic_checks(ctx, length_m))[:3]


def evaluate_seismic(ctx: ScreenContext, length_m: FloatArray) -> tuple:
    """(demand, capacity, cdr, detail) of the governing Extreme Event I sub-check, (n,) each."""
    checks = seismic_checks(ctx, length_m)
    demand, capacity, cdr, low = _governing(checks)
    kh, kh0 = checks["kh"], ctx.a.seismic_kh
    names = np.array(SUBCHECKS, dtype=object)[low]
    detail = np.full(ctx.n, "no seismic load (kh0 = 0)", dtype=object)
    shaking = np.flatnonzero(kh0 > 0)
    if shaking.size:
        words = [
            f"Extreme Event I {nm} ({UNITS[nm]}), kh = {k:.3f} ({k / k0:.1f} kh0)"
            for nm, k, k0 in zip(
                names[shaking].tolist(), kh[shaking].tolist(), kh0[shaking].tolist(), strict=True
            )
        ]
        detail[shaking] = np.array(words, dtype=object)
    invalid = np.flatnonzero(~checks["valid"])
    if invalid.size:
        psi = seismic_angle_deg(kh[invalid])
        words = [
            f"Mononobe-Okabe has no solution: phi - psi - beta = {f:.1f} - {p:.1f} - {b:.1f} < 0"
            for f, p, b in zip(
                ctx.a.retained_friction_deg[invalid].tolist(),
                psi.tolist(),
                ctx.a.backslope_deg[invalid].tolist(),
                strict=True,
            )
        ]
        detail[invalid] = np.array(words, dtype=object)
    case = np.where(kh0 > 0, "Extreme Event I", "").tolist()
    return demand, capacity, cdr, detail.tolist(), case


def report_seismic(ctx: ScreenContext, length_m: FloatArray) -> dict[str, np.ndarray]:
    """Per-segment seismic values kept in CorridorResult.extras."""
    checks = seismic_checks(ctx, length_m)
    kh = checks["kh"]
    out = {
        "seismic_kh": kh,
        "seismic_kae": np.nan_to_num(
            mononobe_okabe_kae(
                ctx.a.retained_friction_deg, ctx.a.backslope_deg, ctx.a.backslope_deg, kh
            ),
            nan=np.nan,
        ),
        "seismic_mo_valid": checks["valid"],
    }
    for key in SUBCHECKS:
        out[f"seismic_{key}_cdr"] = checks[key][2]
    return out


def mo_invalid(ctx: ScreenContext) -> BoolArray:
    """Segments with shaking whose M-O has no solution (the verdict refers them)."""
    kh = wall_kh(ctx.a.seismic_kh, ~ctx.a.abutment)
    ok = mononobe_okabe_valid(ctx.a.retained_friction_deg, ctx.a.backslope_deg, kh)
    return (ctx.a.seismic_kh > 0) & ~ok


EXTRA_CHECKS = (
    ExtraCheck("seismic", evaluate_seismic, report=report_seismic, ratios=seismic_ratios),
)
