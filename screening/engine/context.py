"""What every check needs, computed once per screen: inputs, geometry, loads, design strengths.

Shapes: ``(n,)`` per segment, ``(n, c)`` per segment and load case, ``(n, m)`` per layer.
A check takes a :class:`ScreenContext` and a trial length ``L`` of shape ``(n,)``; checks added
later (compound, seismic) receive the same two arguments.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, fields, is_dataclass, replace

import numpy as np

from screening.engine.arrays import CaseArrays, SegmentArrays
from screening.engine.checks.pressure import coulomb_ka, design_friction_deg, rankine_ka
from screening.engine.geometry import Geometry, build_geometry
from screening.engine.loads import traffic_kpa
from screening.engine.result import CDR_CAP, BoolArray, FloatArray, IntArray
from screening.model import Rules


@dataclass(frozen=True)
class Grades:
    """A grade per layer and what it gives, (n, m) each."""

    index: IntArray
    passes_rupture: BoolArray
    """False where no grade of the family carries T_max (the heaviest is then used)."""
    rupture_capacity: FloatArray
    """Factored rupture capacity per metre run."""
    coverage: FloatArray
    """Rc used in pullout."""


@dataclass(frozen=True)
class InternalSetup:
    """Everything internal that does not depend on L (filled by ``checks.internal.prepare``)."""

    tension: FloatArray
    """Factored T_max, (n, c, m); 0 on padding."""
    tension_design: FloatArray
    """Largest T_max over the cases that check rupture, (n, m)."""
    grade_capacity: FloatArray
    """Factored rupture capacity of every grade, (n, g); -inf on padding."""
    grade_coverage: FloatArray
    """Rc of every grade, (n, g)."""
    rupture_ok: BoolArray
    """(n, m, g): the grade carries the layer's T_max."""
    best: Grades
    """Per layer, the grade with the largest Rc among those that carry T_max (the heaviest
    when none does): the most pullout a layer can get, used by the length search."""
    pullout_unit: FloatArray
    """Factored pullout resistance per metre of Le and unit Rc, phi F* alpha sigma_v' C, (n, c, m)."""
    active_length: FloatArray
    """La, (n, m)."""
    mask: BoolArray


@dataclass(frozen=True)
class ScreenContext:
    """Inputs as arrays plus everything derived from them that does not depend on L."""

    a: SegmentArrays
    geom: Geometry
    live_kpa: FloatArray
    """Unfactored traffic surcharge q_LL, (n,)."""
    slope_surcharge_kpa: FloatArray
    """Equivalent uniform surcharge of a backslope on the layers, 0.5*(0.7H)*tan(beta)*gamma, (n,)."""
    ka_retained: FloatArray
    """Coulomb Ka of the retained fill with delta = beta on a vertical back, (n, c)."""
    ka_fill: FloatArray
    """Rankine Ka of the reinforced fill (level, delta = 0 whatever the backslope), (n, c)."""
    tan_fill: FloatArray
    """Design tan(phi_r), (n, c)."""
    tan_base: FloatArray
    """Design tan of the base sliding friction, min(phi_r, phi_f), (n, c)."""
    found_friction_deg: FloatArray
    """Design phi of the foundation, (n, c)."""
    found_cohesion_kpa: FloatArray
    """Design c' of the foundation, (n, c)."""
    found_undrained_kpa: FloatArray
    """Design cu of the foundation, (n, c); NaN when drained."""
    internal: InternalSetup | None = None
    """Tensions, grades and pullout terms (set by the screen before any check runs)."""
    grade_boost: IntArray | None = None
    """Grade steps added to every layer above the lightest that passes internally, (n,);
    None: none (sizing raises it where no length passes compound stability)."""

    @property
    def boost(self) -> IntArray:
        """``grade_boost`` with None as zeros, (n,)."""
        return np.zeros(self.n, dtype=np.int64) if self.grade_boost is None else self.grade_boost

    @property
    def n(self) -> int:
        return self.a.n

    @property
    def cases(self) -> CaseArrays:
        return self.a.cases

    def take(self, rows: IntArray) -> ScreenContext:
        """The same context for the segments ``rows`` only (for a costly check on a few);
        the context itself when ``rows`` are all its rows in order (it is frozen)."""
        rows = np.asarray(rows, dtype=np.int64)
        if rows.size == self.n and np.array_equal(rows, np.arange(self.n)):
            return self
        return take_rows(self, rows, self.n)


def take_rows(obj, rows: IntArray, n: int):
    """Rows of every per-segment array, list and nested record; shared records left whole."""
    if isinstance(obj, CaseArrays | Rules):
        return obj
    if is_dataclass(obj) and not isinstance(obj, type):
        changes = {f.name: take_rows(getattr(obj, f.name), rows, n) for f in fields(obj)}
        if "n" in changes:
            changes["n"] = len(rows)
        return replace(obj, **changes)
    if isinstance(obj, np.ndarray) and obj.ndim >= 1 and obj.shape[0] == n:
        return obj[rows]
    if isinstance(obj, list) and len(obj) == n:
        return [obj[i] for i in rows.tolist()]
    return obj


def build_context(a: SegmentArrays) -> ScreenContext:
    geom = build_geometry(a)
    c = a.cases
    beta = a.backslope_deg
    phi_b = design_friction_deg(a.retained_friction_deg[:, None], c.tan_phi[None, :])
    phi_r = design_friction_deg(a.fill_friction_deg[:, None], c.tan_phi[None, :])
    phi_f = design_friction_deg(a.found_friction_deg[:, None], c.tan_phi[None, :])
    # Backslope on the layers [from memory, AASHTO Fig. 11.10.6.2.1-2]: the slope over the
    # first 0.7H behind the face as a uniform surcharge of half its height.
    slope_q = (
        0.5 * 0.7 * geom.design_height_m * np.tan(np.radians(beta)) * a.retained_unit_weight_kn_m3
    )
    return ScreenContext(
        a=a,
        geom=geom,
        live_kpa=traffic_kpa(a, geom.design_height_m),
        slope_surcharge_kpa=slope_q,
        ka_retained=coulomb_ka(phi_b, beta[:, None], beta[:, None]),
        ka_fill=rankine_ka(phi_r),
        tan_fill=np.tan(np.radians(phi_r)),
        tan_base=np.tan(np.radians(np.minimum(phi_r, phi_f))),
        found_friction_deg=phi_f,
        found_cohesion_kpa=a.found_cohesion_kpa[:, None] / c.cohesion[None, :],
        found_undrained_kpa=a.found_undrained_kpa[:, None] / c.undrained[None, :],
    )


@dataclass(frozen=True)
class CheckValues:
    """One check over all segments for its governing case (and layer), shape ``(n,)``."""

    demand: FloatArray
    capacity: FloatArray
    cdr: FloatArray
    case: IntArray
    """Index of the governing load case; -1 where no case lists the check."""
    detail: list[str] | None = None
    """Words on where it governs, per segment (None: none to give)."""
    case_name: list[str] | None = None
    """Name of the governing case per segment, for checks whose cases are not the factor
    set's load cases (slip circles: Service I; seismic: Extreme Event I); None: use ``case``."""


def ratio(capacity: FloatArray, demand: FloatArray) -> FloatArray:
    """capacity / demand, CDR_CAP where nothing drives, 0 where a value is undefined; in [0, CDR_CAP]."""
    with np.errstate(divide="ignore", invalid="ignore"):
        r = np.where(demand > 1e-12, capacity / np.where(demand > 1e-12, demand, 1.0), CDR_CAP)
    return cdr_range(r)


def cdr_range(cdr: FloatArray) -> FloatArray:
    """CDRs in [0, CDR_CAP]: NaN (undefined) fails at 0, inf becomes CDR_CAP (what
    ``np.clip(np.nan_to_num(cdr, nan=0.0, posinf=CDR_CAP), 0.0, CDR_CAP)`` gives, cheaper)."""
    return np.clip(np.where(np.isnan(cdr), 0.0, cdr), 0.0, CDR_CAP)


def worst_case(
    cases: CaseArrays, check: str, demand: FloatArray, capacity: FloatArray, cdr: FloatArray
) -> CheckValues:
    """Reduce ``(n, c)`` values to the case with the smallest CDR among those listing ``check``."""
    uses = cases.uses(check)
    masked = np.where(uses[None, :], cdr, np.inf)
    idx = np.argmin(masked, axis=1)
    rows = np.arange(cdr.shape[0])
    none = ~uses.any()
    return CheckValues(
        demand=demand[rows, idx],
        capacity=capacity[rows, idx],
        cdr=np.full(cdr.shape[0], CDR_CAP) if none else cdr[rows, idx],
        case=np.full(cdr.shape[0], -1) if none else idx.astype(np.int64),
    )


ExtraEvaluate = Callable[[ScreenContext, FloatArray], tuple]
"""(ctx, L) -> (demand, capacity, cdr[, detail[, case name]]), each ``(n,)``."""


@dataclass(frozen=True)
class ExtraCheck:
    """A check added by another module (compound, seismic), evaluated like the built-in ones.

    ``sizes_length``: True when a longer L may make it pass, so sizing searches for it.
    ``report``: optional (ctx, L) -> {name: (n,) array} of values to keep in
    ``CorridorResult.extras`` (e.g. the critical circle), evaluated once at the chosen L.
    ``ratios``: optional (ctx, L) -> (demand, capacity, cdr), the same numbers as
    ``evaluate`` without the words, for sizing's trial lengths (words are only shown at
    the chosen L, and a slip check writes a sentence per segment and length).
    """

    name: str
    evaluate: ExtraEvaluate
    sizes_length: bool = True
    report: Callable[[ScreenContext, FloatArray], dict[str, np.ndarray]] | None = None
    ratios: ExtraEvaluate | None = None

    def values(self, ctx: ScreenContext, length_m: FloatArray, words: bool = True) -> CheckValues:
        """The check at L; ``words`` False: detail and case names may be left out."""
        use = self.evaluate if words or self.ratios is None else self.ratios
        out = use(ctx, length_m)
        demand, capacity, cdr = (np.asarray(v, dtype=np.float64) for v in out[:3])
        detail = list(out[3]) if len(out) > 3 else None
        case_name = list(out[4]) if len(out) > 4 else None
        cdr = cdr_range(cdr)
        case = np.full(ctx.n, -1, dtype=np.int64)
        return CheckValues(demand, capacity, cdr, case, detail, case_name)
