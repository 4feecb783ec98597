"""External stability per metre run: sliding, eccentricity, bearing (METHOD section 4).

The reinforced zone is a rigid block of width L and height H. Behind it the retained fill
pushes with Coulomb's thrust (delta = beta on the vertical back, h = H + L tan(beta), acting
at h/3 for the soil and h/2 for uniform surcharges, inclined at beta) [from memory, FHWA GEC 11
ch. 4; AASHTO LRFD 11.10.5]. Passive resistance at the toe is ignored [common practice].

Roles of the loads [from memory, GEC 11 ch. 4]: in sliding and eccentricity the weights
resist (``ev_resisting``, ``es_resisting``), live load is left out of the vertical forces and
only drives horizontally; in bearing every weight and the live load drive (``ev``, ``es``,
``ls``). Thrusts always take their driving factors (``eh``, ``es``, ``ls``), their vertical
components included.

Every function takes a :class:`ScreenContext` and a trial length ``L`` of shape ``(n,)`` and
returns ``(n, c)`` arrays over load cases.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from screening.engine.checks.pressure import vesic_factors
from screening.engine.context import CheckValues, ScreenContext, ratio, worst_case
from screening.engine.result import CDR_CAP, FloatArray
from screening.engine.slip.wall import toe_slope_bearing_factors

UNDRAINED_NC = 2.0 + np.pi
"""Prandtl's Nc for phi = 0 (Vesic 1973; AASHTO Table 10.6.3.1.2a-1 first row)."""


@dataclass(frozen=True)
class Forces:
    """Factored forces on the block, (n, c) each, per metre run."""

    horizontal: FloatArray
    vertical_resisting: FloatArray
    """Sum of vertical forces with the resisting roles (sliding, eccentricity)."""
    vertical_bearing: FloatArray
    moment_overturning: FloatArray
    """About the toe, kN m/m."""
    moment_resisting: FloatArray
    moment_resisting_bearing: FloatArray


def forces(ctx: ScreenContext, length_m: FloatArray) -> Forces:
    a, cs = ctx.a, ctx.cases
    big_h = ctx.geom.design_height_m[:, None]
    length = length_m[:, None]
    tan_b = np.tan(np.radians(a.backslope_deg))[:, None]
    cos_b = np.cos(np.radians(a.backslope_deg))[:, None]
    sin_b = np.sin(np.radians(a.backslope_deg))[:, None]
    gamma_r = a.fill_unit_weight_kn_m3[:, None]
    gamma_b = a.retained_unit_weight_kn_m3[:, None]
    q_d = a.surcharge_kpa[:, None]
    q_l = ctx.live_kpa[:, None]
    ev, ev_r, eh = cs.ev[None, :], cs.ev_resisting[None, :], cs.eh[None, :]
    es, es_r, ls = cs.es[None, :], cs.es_resisting[None, :], cs.ls[None, :]

    h = big_h + length * tan_b
    ka = ctx.ka_retained
    p_soil = eh * 0.5 * ka * gamma_b * h**2
    p_dead = es * ka * q_d * h
    p_live = ls * ka * q_l * h

    # Weights: the block, and the slope wedge over it (reinforced-fill unit weight) at 2L/3.
    w_block = gamma_r * big_h * length
    w_slope = 0.5 * gamma_r * length**2 * tan_b
    m_weight = w_block * length / 2 + w_slope * 2 * length / 3

    horizontal = cos_b * (p_soil + p_dead + p_live)
    fv_res = sin_b * (p_soil + p_dead)
    fv_bear = sin_b * (p_soil + p_dead + p_live)
    v_res = ev_r * (w_block + w_slope) + es_r * q_d * length + fv_res
    v_bear = ev * (w_block + w_slope) + (es * q_d + ls * q_l) * length + fv_bear
    m_over = cos_b * (p_soil * h / 3 + (p_dead + p_live) * h / 2)
    m_res = ev_r * m_weight + es_r * q_d * length**2 / 2 + fv_res * length
    m_res_bear = ev * m_weight + (es * q_d + ls * q_l) * length**2 / 2 + fv_bear * length
    return Forces(horizontal, v_res, v_bear, m_over, m_res, m_res_bear)


def sliding(
    ctx: ScreenContext, length_m: FloatArray, f: Forces | None = None, detail: bool = True
) -> CheckValues:
    """R = V tan(min(phi_r, phi_f)) drained; the lesser with cu*L on an undrained base."""
    f = f or forces(ctx, length_m)
    drained = f.vertical_resisting * ctx.tan_base
    undrained = ctx.found_undrained_kpa * length_m[:, None]
    resist = np.where(np.isnan(undrained), drained, np.fmin(drained, undrained))
    capacity = ctx.a.phi_sliding * resist
    out = worst_case(ctx.cases, "sliding", f.horizontal, capacity, ratio(capacity, f.horizontal))
    if not detail:
        return out
    rows = np.arange(ctx.n)
    case = np.maximum(out.case, 0)
    base_undrained = (undrained < drained)[rows, case]
    words = np.where(base_undrained, "undrained base, cu x L", "drained base").tolist()
    return CheckValues(out.demand, out.capacity, out.cdr, out.case, words)


def eccentricity_m(v: FloatArray, m_res: FloatArray, m_over: FloatArray, length_m) -> FloatArray:
    """e = L/2 - (sum M_R - sum M_O) / sum V, m (positive towards the toe)."""
    with np.errstate(divide="ignore", invalid="ignore"):
        return length_m / 2 - (m_res - m_over) / np.where(v > 0, v, np.nan)


def eccentricity(
    ctx: ScreenContext, length_m: FloatArray, f: Forces | None = None, detail: bool = True
) -> CheckValues:
    """Demand e, capacity limit*L (m); limit on rock or soil from the factor set."""
    f = f or forces(ctx, length_m)
    length = length_m[:, None]
    e = eccentricity_m(f.vertical_resisting, f.moment_resisting, f.moment_overturning, length)
    e = np.nan_to_num(e, nan=length.max() if length.size else 0.0)
    capacity = np.broadcast_to(ctx.a.eccentricity_limit[:, None] * length, e.shape)
    cdr = np.where(e > 0, ratio(capacity, e), CDR_CAP)
    out = worst_case(ctx.cases, "eccentricity", e, capacity, cdr)
    if not detail:
        return out
    words = [
        f"e/L = {r:.3f} (limit {lim:.3f})"
        for r, lim in zip(
            (out.demand / np.maximum(length_m, 1e-9)).tolist(),
            ctx.a.eccentricity_limit.tolist(),
            strict=True,
        )
    ]
    return CheckValues(out.demand, out.capacity, out.cdr, out.case, words)


def water_factor(water_depth_m: FloatArray, width_m: FloatArray) -> FloatArray:
    """C_w_gamma: 0.5 with water at the base, 1.0 at 1.5 B' or deeper, linear between [mem]."""
    return 0.5 + 0.5 * np.clip(water_depth_m / (1.5 * np.maximum(width_m, 1e-9)), 0.0, 1.0)


def bearing(
    ctx: ScreenContext, length_m: FloatArray, f: Forces | None = None, detail: bool = True
) -> CheckValues:
    """Meyerhof sigma_v = V/(L - 2e) against phi*q_n (Vesic factors, no embedment term)."""
    f = f or forces(ctx, length_m)
    length = length_m[:, None]
    e = eccentricity_m(f.vertical_bearing, f.moment_resisting_bearing, f.moment_overturning, length)
    e = np.nan_to_num(e, nan=0.0)
    width = np.maximum(length - 2 * np.abs(e), 0.01 * length)
    sigma = f.vertical_bearing / width
    nc, _, ngamma = vesic_factors(ctx.found_friction_deg)
    cw = water_factor(ctx.a.found_water_depth_m[:, None], width)
    gamma_f = ctx.a.found_unit_weight_kn_m3[:, None]
    # Toe slope in front (engine/slip/wall.py, Vesic 1975 ground-inclination factors).
    g_c, g_gamma, g_cu = toe_slope_bearing_factors(
        ctx.a.toe_slope_deg[:, None], ctx.found_friction_deg
    )
    drained = ctx.found_cohesion_kpa * nc * g_c + 0.5 * gamma_f * width * ngamma * cw * g_gamma
    undrained = UNDRAINED_NC * ctx.found_undrained_kpa * g_cu
    q_n = np.where(np.isnan(undrained), drained, np.fmin(drained, undrained))
    capacity = ctx.a.phi_bearing * q_n
    out = worst_case(ctx.cases, "bearing", sigma, capacity, ratio(capacity, sigma))
    if not detail:
        return out
    rows = np.arange(ctx.n)
    case = np.maximum(out.case, 0)
    b_used = width[rows, case].tolist()
    q_used = q_n[rows, case].tolist()
    words = [f"B' = {b:.2f} m, q_n = {q:.0f} kPa" for b, q in zip(b_used, q_used, strict=True)]
    return CheckValues(out.demand, out.capacity, out.cdr, out.case, words)


EXTERNAL_NAMES = ("sliding", "eccentricity", "bearing")


def external_values(ctx: ScreenContext, length_m: FloatArray) -> tuple[FloatArray, np.ndarray]:
    """Smallest CDR of sliding, eccentricity and bearing at L and the name of that check,
    (n,) each (for the length search)."""
    f = forces(ctx, length_m)
    table = np.stack(
        [
            sliding(ctx, length_m, f, detail=False).cdr,
            eccentricity(ctx, length_m, f, detail=False).cdr,
            bearing(ctx, length_m, f, detail=False).cdr,
        ],
        axis=1,
    )
    low = np.argmin(table, axis=1)
    return table[np.arange(ctx.n), low], np.array(EXTERNAL_NAMES, dtype=object)[low]


def external_cdr(ctx: ScreenContext, length_m: FloatArray) -> FloatArray:
    """Smallest CDR of sliding, eccentricity and bearing at L, (n,) (for the length search)."""
    return external_values(ctx, length_m)[0]
