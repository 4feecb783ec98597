"""Cross-sections for the mechanism check from the inputs and the outcome of a screen.

The mechanism check sees the segment the slip-circle check saw at the chosen length: the
same inputs (:func:`screening.engine.slip.compound.slip_input` at the screen's L, grade
steps and spacing, so the same grades and nominal or design layer strengths), the same
geometry (embedment, a 1.2 m bench and a toe slope falling one design height, a backslope
without a break, surcharges behind the face) and the same cases of the factor set
(METHOD.md in this folder, section 6):

- ``lrfd`` / ``asd``: one case, every load and strength unfactored (Service I; allowable
  stress); the mechanism's strength factor F is compared with 1/phi (or FS):
  ``target = 1 / resistance["compound"]`` (``compound_abutment`` under abutments).
- ``partial-factor``: every case that lists ``compound``: unit weights times ev, the
  permanent surcharge times es, the live one times ls, tan phi', c' and cu divided by their
  partial factors, layers at their design strengths; target ``1 / resistance`` (1.0 for R1).
- A foundation with cu: each case twice, short term (Tresca, cu, no pore pressure) and long
  term (c', phi' with the water table), as the slip check does.

Screening choices for the model [cp]: the firm layer at the given depth, or the default of
``section.py`` (2H, at least H below a toe-slope foot) when none is given; a firm layer
given shallower than the foot of a toe slope is taken at the foot plus 0.1 H (a deeper base
only adds mechanisms, so this is on the safe side); a water table above the ground in front
of a toe slope is taken at that ground (the model refuses a flooded toe); on rock the base
of the model is the base of the reinforced zone.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

import numpy as np

from screening.engine.arrays import SegmentArrays
from screening.engine.checks.internal import prepare
from screening.engine.context import build_context, take_rows
from screening.engine.mechanism.section import MechanismLayer, MechanismSection, SoilStrength
from screening.engine.result import CorridorResult
from screening.engine.slip.check import factor_cases
from screening.engine.slip.compound import case_rows, slip_input
from screening.engine.slip.wall import Factors, WallSlipInput
from screening.model.errors import InputError

FIRM_BELOW_FOOT_RATIO = 0.1
"""A firm layer given above the foot of a toe slope is lowered to this times H below it."""


@dataclass(frozen=True)
class MechanismCase:
    """One cross-section to solve: a segment under one case of the factor set."""

    row: int
    """Row of the segment in the screen."""
    segment_id: str
    case: str
    """Case name as the slip check words it ('Service I', 'DA1-C2, short term (cu)')."""
    target: float
    """The strength factor the section must reach: 1 / resistance factor of compound."""
    section: MechanismSection | None
    """None when the section lies outside the mechanism model (``problem`` says why)."""
    problem: str = ""


def screen_inputs(a: SegmentArrays, result: CorridorResult, rows: np.ndarray) -> WallSlipInput:
    """The slip check's input for ``rows`` of a screen, at the screen's chosen L, grade steps
    and spacing (a closer spacing chosen by the screen changes the layers)."""
    rows = np.asarray(rows, dtype=np.int64)
    sub = take_rows(a, rows, a.n)
    spacing = result.extras.get("spacing_m")
    if spacing is not None:
        sub = replace(sub, spacing_m=np.asarray(spacing, dtype=np.float64)[rows])
    ctx = build_context(sub)
    ctx = replace(ctx, internal=prepare(ctx))
    boost = np.asarray(result.grade_boost, dtype=np.int64)[rows]
    ctx = replace(ctx, grade_boost=boost)
    return slip_input(ctx, np.asarray(result.length_m, dtype=np.float64)[rows])


def compound_cases(a: SegmentArrays) -> list[Factors]:
    """The factor set's cases for overall stability, as the slip check takes them."""
    return factor_cases(a.method, case_rows(a.cases))


def mechanism_cases(
    a: SegmentArrays, result: CorridorResult, rows: np.ndarray, grade_steps: int = 0
) -> list[MechanismCase]:
    """Every (segment, case) section of ``rows`` (module docstring). ``grade_steps`` adds
    grade steps to every layer beyond the screen's (the test of a stronger grade)."""
    rows = np.asarray(rows, dtype=np.int64)
    if rows.size == 0:
        return []
    if grade_steps:
        result = replace(result, grade_boost=np.asarray(result.grade_boost) + grade_steps)
    inp = screen_inputs(a, result, rows)
    resistance = a.resistance
    phi = np.where(
        inp.abutment,
        resistance.get("compound_abutment", resistance["compound"]),
        resistance["compound"],
    )
    cases = compound_cases(a)
    undrained = np.isfinite(inp.found_undrained_kpa)
    out: list[MechanismCase] = []
    for k, row in enumerate(rows.tolist()):
        terms = (False, True) if undrained[k] else (False,)
        for f in cases:
            for short in terms:
                label = f.name
                if undrained[k]:
                    label = f"{f.name}, {'short term (cu)' if short else 'long term'}"
                section, problem = section_from_input(inp, k, f, short, a.ids[row])
                out.append(
                    MechanismCase(row, a.ids[row], label, 1.0 / float(phi[k]), section, problem)
                )
    return out


def _soil(gamma: float, c: float, phi_deg: float, f: Factors) -> SoilStrength:
    tan_d = math.tan(math.radians(phi_deg)) / f.tan_phi
    return SoilStrength(f.weight * gamma, c / f.cohesion, math.degrees(math.atan(tan_d)))


def section_from_input(
    inp: WallSlipInput, k: int, f: Factors, short: bool, segment_id: str
) -> tuple[MechanismSection | None, str]:
    """Row ``k`` of the slip input as a mechanism section under case ``f`` (``short``: the
    short-term, undrained foundation), or None and the reason when it is outside the model."""
    h = float(inp.height_m[k])
    d = float(inp.embedment_m[k])
    toe = float(inp.toe_slope_deg[k])
    fall = float(inp.toe_slope_height_m[k]) if toe > 0.01 else 0.0
    if short:
        found = SoilStrength(
            f.weight * float(inp.found_unit_weight_kn_m3[k]),
            undrained_strength_kpa=float(inp.found_undrained_kpa[k]) / f.undrained,
        )
        water = -math.inf
    else:
        found = _soil(
            float(inp.found_unit_weight_kn_m3[k]),
            float(inp.found_cohesion_kpa[k]),
            float(inp.found_friction_deg[k]),
            f,
        )
        water = min(-float(inp.found_water_depth_m[k]), d - fall)
    firm = None if inp.firm_depth_m is None else float(inp.firm_depth_m[k])
    if firm is not None and not math.isfinite(firm):
        firm = None
    if firm is not None and fall > 0.0:
        firm = max(firm, fall - d + FIRM_BELOW_FOOT_RATIO * h)
    mask = inp.layer_mask[k]
    front = inp.layer_rupture_kn_m if inp.layer_front_kn_m is None else inp.layer_front_kn_m
    layers = tuple(
        MechanismLayer(
            float(inp.layer_level_m[k, j]),
            float(inp.layer_rupture_kn_m[k, j]),
            float(inp.layer_pullout_kn_m2[k, j]),
            float(front[k, j]),
        )
        for j in np.flatnonzero(mask).tolist()
    )
    try:
        section = MechanismSection(
            design_height_m=h,
            embedment_m=d,
            length_m=float(inp.length_m[k]),
            foundation=found,
            reinforced=_soil(
                float(inp.fill_unit_weight_kn_m3[k]),
                float(inp.fill_cohesion_kpa[k]),
                float(inp.fill_friction_deg[k]),
                f,
            ),
            retained=_soil(
                float(inp.retained_unit_weight_kn_m3[k]),
                float(inp.retained_cohesion_kpa[k]),
                float(inp.retained_friction_deg[k]),
                f,
            ),
            layers=layers,
            backslope_deg=float(inp.backslope_deg[k]),
            toe_slope_deg=toe,
            toe_slope_fall_m=fall,
            depth_to_firm_m=firm,
            water_level_m=water,
            dead_surcharge_kpa=f.permanent * float(inp.surcharge_kpa[k]),
            live_surcharge_kpa=f.live * float(inp.live_kpa[k]),
            segment_id=segment_id,
        )
    except InputError as err:
        return None, f"not run: {err.field} {err.message}"
    return section, ""
