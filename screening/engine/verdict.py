"""Outcome of each segment: clear, marginal or refer, with the reasons in words (METHOD section 7).

Every threshold comes from :class:`screening.model.Rules`. The decisions are numpy masks over
all segments; only the sentences are written one by one, for the segments a mask flags.

- refer: a check fails at the chosen L (which is the longest screening tries when nothing
  passes), or the segment is outside the scope of screening (too high, soft foundation,
  marginal fill, water in the fill, steep backslope, strong shaking, tiered or back-to-back).
- marginal: it passes, but a margin is thin (below), or L exceeds
  Rules.marginal_length_ratio*H (and the 2.4 m minimum length: a short wall at the minimum
  is not long for its height in any costly sense), whether the checks or the rule of thumb
  for a steep backslope set it, or H exceeds Rules.marginal_height_m.
- clear: otherwise.

Which CDRs count as a thin margin (a change from METHOD §7's "smallest CDR below 1.10",
which marked almost every passing segment marginal): screening chooses the lightest grade
per layer and the shortest passing L, so some CDRs sit just above 1.0 by construction and
say nothing about risk. Those are left out of the thin-margin test:
- rupture (and pullout of steel, whose coverage comes with the grade): tuned per layer by
  the grade choice; instead a layer that needs the heaviest grade of a family of several
  grades is thin (a one-grade family is judged by its rupture CDR);
- every check that sizes L, when the checks lengthened L beyond the rule of thumb: the
  lengthening itself is the answer, reported in words, and L > 0.9H catches a costly one.
A check that passes at the rule-of-thumb length by less than Rules.marginal_cdr is thin.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from screening.engine.checks.seismic import mo_invalid
from screening.engine.context import CheckValues, ScreenContext
from screening.engine.result import BoolArray, FloatArray
from screening.engine.sizing import Sizing


@dataclass(frozen=True)
class Outcome:
    verdict: list[str]
    reasons: list[tuple[str, ...]]
    governing: list[str]
    min_cdr: FloatArray


def _scope(ctx: ScreenContext) -> list[tuple[str, BoolArray, Callable[[int], str]]]:
    """(key, mask, sentence for segment i) of every out-of-scope rule."""
    a, r, h = ctx.a, ctx.a.rules, ctx.geom.design_height_m
    cu = a.found_undrained_kpa
    arrangement = np.array(a.arrangement, dtype=object)
    return [
        ("height", h > r.max_height_m + 1e-9,
         lambda i: f"design height {h[i]:.1f} m > {r.max_height_m:g} m: outside screening"),
        ("soft-foundation", ~np.isnan(cu) & (cu < r.min_undrained_strength_kpa),
         lambda i: f"foundation cu {cu[i]:.0f} kPa < {r.min_undrained_strength_kpa:g} kPa: "
         "soft foundation, outside screening"),
        ("fill", a.fill_fines_percent > r.max_fines_percent,
         lambda i: f"fines {a.fill_fines_percent[i]:.0f} % > {r.max_fines_percent:g} %: "
         "marginal fill, outside screening"),
        ("fill", a.fill_plasticity_index > r.max_plasticity_index,
         lambda i: f"plasticity index {a.fill_plasticity_index[i]:.0f} > "
         f"{r.max_plasticity_index:g}: marginal fill, outside screening"),
        ("fill", a.fill_friction_deg < r.min_fill_friction_deg,
         lambda i: f"fill friction {a.fill_friction_deg[i]:.0f}° < {r.min_fill_friction_deg:g}°: "
         "marginal fill, outside screening"),
        ("water", a.water_in_fill,
         lambda i: "water in the reinforced zone or flooding at the face: outside screening"),
        ("backslope", a.backslope_deg > r.max_backslope_deg + 1e-9,
         lambda i: f"backslope {a.backslope_deg[i]:.1f}° steeper than {r.max_backslope_deg:g}° "
         "(2H:1V): outside screening"),
        ("backslope", a.backslope_deg > a.retained_friction_deg + 1e-9,
         lambda i: f"backslope {a.backslope_deg[i]:.1f}° steeper than the retained soil's "
         f"friction angle {a.retained_friction_deg[i]:.0f}°: the slope itself is not stable, "
         "outside screening"),
        ("seismic", a.seismic_kh > r.max_seismic_kh + 1e-12,
         lambda i: f"seismic kh {a.seismic_kh[i]:.2f} > {r.max_seismic_kh:g}: outside screening"),
        # Added with the seismic check (engine/checks/seismic.py): M-O without a solution.
        ("seismic", mo_invalid(ctx),
         lambda i: "Mononobe-Okabe has no solution (phi - psi - beta < 0): the retained "
         "soil is not stable under the design shaking, outside screening"),
        ("arrangement", arrangement != "single",
         lambda i: f"{arrangement[i]} walls: outside screening"),
    ]  # fmt: skip


SIZING_CHECKS = ("sliding", "eccentricity", "bearing", "pullout")


def decide(
    ctx: ScreenContext,
    sizing: Sizing,
    checks: dict[str, CheckValues],
    unchecked: set[str],
    *,
    heaviest_grade: BoolArray | None = None,
    sizing_names: tuple[str, ...] = SIZING_CHECKS,
) -> Outcome:
    """Verdict, reasons, governing check and smallest CDR of every segment.

    ``heaviest_grade`` (n,): some layer needs the heaviest grade of its family (or none
    carries it). ``sizing_names``: the checks that set L (built-in and added).
    """
    n, r = ctx.n, ctx.a.rules
    h, length = ctx.geom.design_height_m, sizing.length_m
    names = [k for k in checks if k not in unchecked]
    if names:
        table = np.stack([checks[k].cdr for k in names], axis=1)
        low = np.argmin(table, axis=1)
        min_cdr = table[np.arange(n), low]
        governing = np.array(names, dtype=object)[low]
    else:
        min_cdr = np.full(n, np.inf)
        governing = np.full(n, "", dtype=object)
    reasons: list[list[str]] = [[] for _ in range(n)]
    out_of_scope = np.zeros(n, dtype=bool)
    first_scope = np.full(n, "", dtype=object)
    for key, mask, words in _scope(ctx):
        first_scope = np.where(mask & ~out_of_scope, key, first_scope)
        out_of_scope |= mask
        for i in np.flatnonzero(mask).tolist():
            reasons[i].append(words(i))

    # Python lists for the sentences: indexing numpy arrays one by one is slow.
    length_l, ratio_l = length.tolist(), (length / h).tolist()
    h_l, cdr_min_l, gov_l = h.tolist(), min_cdr.tolist(), governing.tolist()
    failed = np.zeros(n, dtype=bool)
    for name in names:
        cdr = checks[name].cdr
        bad = cdr < 1.0 - 1e-9
        failed |= bad
        detail = checks[name].detail
        for i in np.flatnonzero(bad).tolist():
            where = f", {detail[i]}" if detail and detail[i] else ""
            reasons[i].append(
                f"{name} CDR {float(cdr[i]):.2f} < 1.0 at L = {length_l[i]:.1f} m "
                f"({ratio_l[i]:.2f}H){where}"
            )
    for i in np.flatnonzero(sizing.exhausted).tolist():
        reasons[i].append(
            f"no length up to {r.max_screen_length_ratio:g}H passes every check: full design needed"
        )

    lengthened = length > ctx.geom.rule_length_m + 1e-9
    thin = np.full(n, np.inf)
    thin_name = np.full(n, "", dtype=object)
    for name in names:
        cdr = np.asarray(checks[name].cdr, dtype=np.float64)
        counts = np.ones(n, dtype=bool)
        if name == "rupture":
            # Grade-tuned, unless the family has a single grade (nothing was chosen).
            counts = ctx.a.grade_count <= 1
        elif name == "pullout":
            counts = ~ctx.a.inextensible & ~lengthened
        elif name in sizing_names:
            counts = ~lengthened
        take = counts & (cdr < thin)
        thin = np.where(take, cdr, thin)
        thin_name = np.where(take, name, thin_name)
    low_cdr = thin < r.marginal_cdr
    top_grade = np.zeros(n, dtype=bool) if heaviest_grade is None else heaviest_grade
    long_l = (length > r.marginal_length_ratio * h + 1e-9) & (length > r.rule_length_min_m + 1e-9)
    long_l &= ~sizing.exhausted  # at the search limit the failing check says it all
    tall = h > r.marginal_height_m + 1e-9
    refer = out_of_scope | failed | sizing.exhausted
    thin_l, thin_name_l = thin.tolist(), thin_name.tolist()
    for i in np.flatnonzero(low_cdr & ~refer).tolist():
        reasons[i].append(
            f"{thin_name_l[i]} passes with little margin: CDR {thin_l[i]:.2f} < "
            f"{r.marginal_cdr:g} at the rule-of-thumb length"
        )
    for i in np.flatnonzero(top_grade & ~refer).tolist():
        reasons[i].append("a layer needs the heaviest grade of its reinforcement family")
    for i in np.flatnonzero(long_l).tolist():
        reasons[i].append(
            f"L = {length_l[i]:.1f} m is {ratio_l[i]:.2f}H > {r.marginal_length_ratio:g}H"
        )
    for i in np.flatnonzero(tall & ~out_of_scope).tolist():
        reasons[i].append(f"design height {h_l[i]:.1f} m > {r.marginal_height_m:g} m")
    marginal = ~refer & (low_cdr | top_grade | long_l | tall)
    clear = ~refer & ~marginal
    for i in np.flatnonzero(clear).tolist():
        reasons[i].append(
            f"every check passes (smallest CDR {cdr_min_l[i]:.2f}, {gov_l[i]}); "
            "no margin below the thresholds"
        )
    rule = ctx.geom.rule_length_m
    rule_l = rule.tolist()
    for i in np.flatnonzero(lengthened & ~sizing.exhausted).tolist():
        reasons[i].append(
            f"L = {length_l[i]:.1f} m ({ratio_l[i]:.2f}H), lengthened by the checks "
            f"from the rule-of-thumb {rule_l[i]:.1f} m"
        )
    for i in np.flatnonzero(~lengthened).tolist():
        reasons[i].append(f"L = {length_l[i]:.1f} m ({ratio_l[i]:.2f}H) by rule of thumb")

    verdict = np.where(refer, "refer", np.where(marginal, "marginal", "clear")).tolist()
    governing = np.where(out_of_scope, first_scope, governing).tolist()
    return Outcome(verdict, [tuple(x) for x in reasons], governing, min_cdr)
