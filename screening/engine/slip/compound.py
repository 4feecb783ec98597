"""Compound and global stability of MSE wall segments (METHOD section 6), vectorised.

Builds each segment's cross-section (wall face, embedment, a toe slope in front with a bench,
a backslope behind, the three soils and the reinforcement layers), runs the slip-circle
search of :mod:`screening.engine.slip.search` under the factor set, and reports per segment
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

Geometry and its screening assumptions: :mod:`screening.engine.slip.wall`.
"""

from __future__ import annotations

import weakref

import numpy as np

from screening.engine.checks import internal
from screening.engine.context import ExtraCheck, ScreenContext
from screening.engine.result import FloatArray
from screening.engine.slip.check import CompoundResult, compound_check
from screening.engine.slip.density import STANDARD
from screening.engine.slip.wall import Factors, WallSlipInput

__all__ = ["EXTRA_CHECKS", "CompoundResult", "compound_check", "shared_search", "slip_input"]


# --------------------------------------------------------------------------- engine hook


def slip_input(ctx: ScreenContext, length_m: FloatArray) -> WallSlipInput:
    """The compound-check input of every segment of a screen at reinforcement length L.

    Layers take the grade the internal check chooses at L. Strengths: nominal long-term
    rupture strength and pullout resistance (the factored values divided by their resistance
    factors) for LRFD and ASD, whose overall factor is applied to F; the design (factored)
    values for partial-factor sets.
    """
    a, g = ctx.a, ctx.geom
    n = ctx.n
    if a.method in ("lrfd", "asd"):
        nominal = internal.nominal_layer_strengths(ctx, length_m)
        rupture, pullout = nominal["rupture_kn_m"], nominal["pullout_kn_m2"]
    else:
        s = ctx.internal if ctx.internal is not None else internal.prepare(ctx)
        grades = internal.choose_grades(ctx, s, length_m)
        uses = ctx.cases.uses("pullout")
        pick = uses if uses.any() else np.ones_like(uses)
        unit = np.where(pick[None, :, None], s.pullout_unit, np.inf).min(axis=1)
        rupture, pullout = grades.rupture_capacity, unit * grades.coverage
    zeros = np.zeros(n)
    return WallSlipInput(
        height_m=g.design_height_m,
        embedment_m=g.embedment_m,
        length_m=np.asarray(length_m, dtype=np.float64),
        backslope_deg=a.backslope_deg,
        toe_slope_deg=a.toe_slope_deg,
        toe_slope_height_m=g.design_height_m,
        fill_unit_weight_kn_m3=a.fill_unit_weight_kn_m3,
        fill_cohesion_kpa=zeros,
        fill_friction_deg=a.fill_friction_deg,
        retained_unit_weight_kn_m3=a.retained_unit_weight_kn_m3,
        retained_cohesion_kpa=zeros,
        retained_friction_deg=a.retained_friction_deg,
        found_unit_weight_kn_m3=a.found_unit_weight_kn_m3,
        found_cohesion_kpa=a.found_cohesion_kpa,
        found_friction_deg=a.found_friction_deg,
        found_undrained_kpa=a.found_undrained_kpa,
        found_water_depth_m=a.found_water_depth_m,
        surcharge_kpa=a.surcharge_kpa,
        live_kpa=ctx.live_kpa,
        abutment=a.abutment,
        layer_level_m=np.where(g.layer_mask, g.design_height_m[:, None] - g.layer_depth_m, 0.0),
        layer_mask=g.layer_mask,
        layer_rupture_kn_m=np.where(g.layer_mask, np.nan_to_num(rupture), 0.0),
        layer_pullout_kn_m2=np.where(g.layer_mask, np.nan_to_num(pullout), 0.0),
        tangent=~a.inextensible,
        firm_depth_m=np.where(a.found_rock, 0.0, a.found_firm_depth_m),
    )


LIBRARY = 6
"""Critical circles remembered per segment to start the search at another length."""
LENGTHS = 16
"""Lengths whose results are remembered per segment (sizing tries about ten)."""


class _Memo:
    """Results of the slip search per segment and length within one screen.

    Sizing asks for every check at several trial lengths (and grade steps), on all segments
    and then on the few that fail (a context with those rows only); rows are matched by
    segment id, so both share one memo. The search runs once per segment, length and grade
    step; most segments are searched once, at the length the built-in checks need; the
    others start from the circles already found.
    """

    def __init__(self, ids: list[str]) -> None:
        self.ids = np.asarray(ids, dtype=str)
        self.order = np.argsort(self.ids, kind="stable")
        self.sorted_ids = self.ids[self.order]
        n = len(ids)
        # Results at up to LENGTHS lengths per segment (oldest overwritten first).
        self.length = np.full((n, LENGTHS), np.nan)
        self.boost = np.zeros((n, LENGTHS), dtype=np.int64)
        self.slot = np.zeros(n, dtype=np.int64)
        self.params = np.full((n, LIBRARY, 3), np.nan)
        self.values: dict[str, np.ndarray] = {}

    def rows(self, ids: list[str]) -> np.ndarray | None:
        """Rows of this memo for ``ids`` (None when some id is not in it)."""
        want = np.asarray(ids, dtype=str)
        if want.size == 0:
            return np.zeros(0, dtype=np.int64)
        pos = np.clip(np.searchsorted(self.sorted_ids, want), 0, len(self.sorted_ids) - 1)
        if self.sorted_ids.size == 0 or not np.all(self.sorted_ids[pos] == want):
            return None
        return self.order[pos]

    def get(
        self, ctx: ScreenContext, length_m: FloatArray, rows: np.ndarray, runner
    ) -> dict[str, np.ndarray]:
        length = np.asarray(length_m, dtype=np.float64)
        boost = ctx.boost
        same = (np.abs(self.length[rows] - length[:, None]) < 1e-9) & (
            self.boost[rows] == boost[:, None]
        )  # (r, LENGTHS): this length and grade step already searched
        use = np.argmax(same, axis=1)
        todo = np.flatnonzero(~same.any(axis=1))
        if todo.size:
            target = rows[todo]
            found = runner(ctx, length, todo, self.params[target])
            fresh = _flatten(found)
            # Keep every critical circle found (a library of modes, oldest dropped first).
            params = np.stack([found.compound.params, found.global_.params], axis=1)
            self.params[target] = np.concatenate([params, self.params[target]], axis=1)[:, :LIBRARY]
            slot = self.slot[target]
            for key, value in fresh.items():
                if key not in self.values:
                    shape = (len(self.ids), LENGTHS)
                    self.values[key] = (
                        np.zeros(shape, dtype=value.dtype)
                        if value.dtype != object
                        else np.full(shape, "", dtype=object)
                    )
                self.values[key][target, slot] = value
            self.length[target, slot] = length[todo]
            self.boost[target, slot] = boost[todo]
            self.slot[target] = (slot + 1) % LENGTHS
            use[todo] = slot
        return {key: value[rows, use] for key, value in self.values.items()}


def case_rows(cs) -> list[Factors]:
    """The cases of ``cs`` (a screen's CaseArrays) that check overall stability, as objects
    with the LoadCase field names (what ``factor_cases`` takes)."""
    uses = cs.uses("compound").tolist()
    return [
        Factors(
            name=name,
            weight=float(cs.ev[k]),
            permanent=float(cs.es[k]),
            live=float(cs.ls[k]),
            tan_phi=float(cs.tan_phi[k]),
            cohesion=float(cs.cohesion[k]),
            undrained=float(cs.undrained[k]),
        )
        for k, name in enumerate(cs.names)
        if uses[k]
    ]


def _flatten(found: CompoundResult) -> dict[str, np.ndarray]:
    out = {}
    for fam, check in (("compound", found.compound), ("global", found.global_)):
        for key in ("demand", "capacity", "cdr", "factor", "centre_x_m", "centre_y_m", "radius_m"):
            out[f"{fam}_{key}"] = np.asarray(getattr(check, key), dtype=np.float64)
        out[f"{fam}_exit_m"] = np.asarray(check.params[:, 0], dtype=np.float64)
        out[f"{fam}_entry_m"] = np.asarray(check.params[:, 1], dtype=np.float64)
        out[f"{fam}_converged"] = np.asarray(check.converged, dtype=bool)
        out[f"{fam}_found"] = np.asarray(check.found, dtype=bool)
        out[f"{fam}_case"] = np.asarray(check.case, dtype=object)
    return out


def _static_run(ctx: ScreenContext, length_m, todo, warm) -> CompoundResult:
    """The static check under the factor set, for rows ``todo`` of ``ctx``."""
    inp = slip_input(ctx, length_m).take(todo)
    cases = case_rows(ctx.cases)
    return compound_check(inp, ctx.a.method, ctx.a.resistance, cases, STANDARD, warm=warm)


_MEMOS: dict[tuple[int, str], tuple[weakref.ref, _Memo]] = {}
"""One memo per screen and kind of run, keyed by the screen's load-case record (shared by a
context and its subsets)."""


def _owner(ctx: ScreenContext, tag: str) -> tuple[object, str, bool]:
    """The object a screen's memo of ``tag`` is keyed by, the key's tag, and whether rows
    can be matched by segment id (ids unique)."""
    unique = np.unique(np.asarray(ctx.a.ids, dtype=str)).size == ctx.n
    if not unique:
        # Ids repeat (a corridor built in code): rows cannot be matched, so no sharing.
        return ctx, f"{tag}-own", False
    return ctx.a.cases, tag, True


def shared_search(
    ctx: ScreenContext, length_m: FloatArray, tag: str = "static", runner=_static_run
) -> dict[str, np.ndarray]:
    """Slip results of every row of ``ctx`` at ``length_m`` through the screen's memo.

    ``runner(ctx, length_m, todo, warm) -> CompoundResult`` searches rows ``todo``;
    ``tag`` names the kind of run (one memo each). Values are (n,) arrays keyed
    ``"<family>_<field>"`` for the families compound and global.
    """
    for key in [k for k, (ref, _) in _MEMOS.items() if ref() is None]:
        del _MEMOS[key]
    owner, tag, unique = _owner(ctx, tag)
    entry = _MEMOS.get((id(owner), tag))
    rows = None
    if entry is not None and entry[0]() is owner:
        rows = entry[1].rows(ctx.a.ids) if unique else np.arange(ctx.n)
    if rows is None:
        entry = (weakref.ref(owner), _Memo(list(ctx.a.ids)))
        _MEMOS[(id(owner), tag)] = entry
        rows = np.arange(ctx.n)
    return entry[1].get(ctx, length_m, rows, runner)


def _family_ratios(family: str):
    def ratios(ctx: ScreenContext, length_m: FloatArray) -> tuple:
        v = shared_search(ctx, length_m)
        # A critical circle whose iteration did not settle is not trusted: the segment fails
        # the check and the words say why (never a silent number).
        cdr = np.where(v[f"{family}_converged"], v[f"{family}_cdr"], 0.0)
        return v[f"{family}_demand"], v[f"{family}_capacity"], cdr

    return ratios


def _family_values(family: str):
    def evaluate(ctx: ScreenContext, length_m: FloatArray) -> tuple:
        v = shared_search(ctx, length_m)
        converged = v[f"{family}_converged"]
        found = v[f"{family}_found"]
        demand, capacity, cdr = _family_ratios(family)(ctx, length_m)
        detail = np.full(ctx.n, f"no {family} circle in the search range", dtype=object)
        rows = np.flatnonzero(found)
        if rows.size:
            detail[rows] = np.array(
                _circle_words(v, family, rows, np.asarray(length_m)[rows]), dtype=object
            )
        stuck = np.flatnonzero(~converged)
        detail[stuck] = "Bishop iteration did not converge on the critical circle: full design"
        case = [c or "" for c in v[f"{family}_case"].tolist()]
        return demand, capacity, cdr, detail.tolist(), case

    return evaluate


def _circle_words(v: dict, family: str, rows: np.ndarray, length_m: FloatArray) -> list[str]:
    """Where the critical circle runs, in the terms a section drawing uses: where it leaves
    the ground in front, where it enters behind, how deep it goes (its centre can lie far
    away: a nearly straight surface has a large radius)."""
    exit_, entry = v[f"{family}_exit_m"][rows], v[f"{family}_entry_m"][rows]
    xc, yc, r = (v[f"{family}_{k}"][rows] for k in ("centre_x_m", "centre_y_m", "radius_m"))
    low_x = np.clip(xc, exit_, entry)
    deepest = -(yc - np.sqrt(np.maximum(r**2 - (low_x - xc) ** 2, 0.0)))
    out = []
    for e, n, d, big_l, f, c in zip(
        exit_.tolist(),
        entry.tolist(),
        deepest.tolist(),
        length_m.tolist(),
        v[f"{family}_factor"][rows].tolist(),
        v[f"{family}_case"][rows].tolist(),
        strict=True,
    ):
        front = "the toe" if e > -0.05 else f"{-e:.1f} m in front of the toe"
        back = n - big_l
        into = (
            f"{back:.1f} m behind the reinforced zone"
            if back > 0.05
            else (
                f"{n:.1f} m behind the face"
                if back < -0.05
                else "at the back of the reinforced zone"
            )
        )
        depth = f"{d:.1f} m below the base at its deepest" if d > 0.05 else "above the base"
        case = f", {c}" if c else ""
        out.append(f"circle from {front} to {into}, {depth}, F = {f:.2f}{case}")
    return out


def _report(ctx: ScreenContext, length_m: FloatArray) -> dict[str, np.ndarray]:
    """Critical circles at the chosen L for CorridorResult.extras (coordinates: x from the
    face into the fill, y above the base of the reinforced zone, metres)."""
    v = shared_search(ctx, length_m)
    out = {}
    for fam in ("compound", "global"):
        out[f"{fam}_circle_x_m"] = v[f"{fam}_centre_x_m"]
        out[f"{fam}_circle_y_m"] = v[f"{fam}_centre_y_m"]
        out[f"{fam}_circle_r_m"] = v[f"{fam}_radius_m"]
        # where the slip surface meets the ground: the arc between them is the surface, the
        # rest of the circle is not (a drawing must stop there)
        out[f"{fam}_circle_exit_x_m"] = v[f"{fam}_exit_m"]
        out[f"{fam}_circle_entry_x_m"] = v[f"{fam}_entry_m"]
        out[f"{fam}_factor"] = v[f"{fam}_factor"]
        out[f"{fam}_converged"] = v[f"{fam}_converged"]
    return out


EXTRA_CHECKS = (
    ExtraCheck(
        "compound",
        _family_values("compound"),
        sizes_length=True,
        report=_report,
        ratios=_family_ratios("compound"),
    ),
    ExtraCheck(
        "global", _family_values("global"), sizes_length=True, ratios=_family_ratios("global")
    ),
)
