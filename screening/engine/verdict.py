"""Outcome of each segment: clear, marginal or refer, with the reasons in words (METHOD section 7).

Every threshold comes from :class:`screening.model.Rules` (presets/rules.toml, where the three
verdicts are defined in the same words as here and in README). The decisions are numpy masks
over all segments; only the sentences are written one by one, for the segments a mask flags.

- refer: a check fails at the chosen reinforcement (the longest length, heaviest grade and
  closest spacing screening tries, when nothing passes), or the segment is outside the scope
  of screening (too high, soft foundation, marginal fill, water in the fill, steep backslope,
  strong shaking, tiered or back-to-back).
- marginal: it passes, but one of: a check of Rules.margin_checks (bearing and global: the
  foundation decides them, more reinforcement hardly helps) passes by less than
  Rules.marginal_cdr; L exceeds Rules.marginal_length_ratio*H (and the 2.4 m minimum); a
  layer needs the heaviest grade of its family, or a closer spacing than the family's; H
  exceeds Rules.marginal_height_m.
- clear: otherwise.

The other checks set the reinforcement: sizing lengthens L or raises the grade until they
pass, so a CDR near 1.0 on them is what a standard design does and says nothing about risk;
the words name the check that set L ("set by compound: CDR about 1.00 by construction") and
a long or heavy result shows as L > 0.9H or the heaviest grade. Rupture of a family with a
single grade cannot be tuned and counts as a margin check. Detailing minimums (L >=
max(0.7H, 2.4 m), Le >= 0.9 m, embedment) are rules met by sizing, reported as such, never
as a margin. The table's "least margin" is the smallest CDR among the margin checks.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from screening.engine.checks.seismic import mo_invalid
from screening.engine.context import CheckValues, ScreenContext
from screening.engine.result import BoolArray, FloatArray, cdr_text
from screening.engine.sizing import ANCHORAGE_RULE, RULE_OF_THUMB, Sizing


@dataclass(frozen=True)
class Outcome:
    verdict: list[str]
    reasons: list[tuple[str, ...]]
    governing: list[str]
    min_cdr: FloatArray
    margin_check: list[str]
    """The margin check (Rules.margin_checks) with the least CDR ("" when none applies)."""
    margin_cdr: FloatArray
    """Its CDR (inf where every check set the reinforcement or none applies)."""


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
    closer_spacing: list[str] | None = None,
) -> Outcome:
    """Verdict, reasons, governing check and smallest CDR of every segment.

    ``heaviest_grade`` (n,): some layer needs the heaviest grade of its family (or none
    carries it). ``sizing_names``: the checks that size L (built-in and added).
    ``closer_spacing``: per segment, words on a spacing closer than the family's ("" none).
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
    h_l = h.tolist()
    set_by = np.asarray(sizing.set_by, dtype=object)
    failed = np.zeros(n, dtype=bool)
    for name in names:
        cdr = checks[name].cdr
        bad = cdr < 1.0 - 1e-9
        failed |= bad
        detail = checks[name].detail
        for i in np.flatnonzero(bad).tolist():
            where = f", {detail[i]}" if detail and detail[i] else ""
            reasons[i].append(
                f"{name} CDR {cdr_text(cdr[i])} < 1.00 at L = {length_l[i]:.1f} m "
                f"({ratio_l[i]:.2f}H){where}"
            )
    for i in np.flatnonzero(sizing.exhausted).tolist():
        reasons[i].append(
            f"no length up to {r.max_screen_length_ratio:g}H passes every check, even with "
            "the heaviest grades screening tries: full design needed"
        )

    # The checks that set the reinforcement: CDR about 1.0 by construction.
    tuned = (set_by != RULE_OF_THUMB) & (set_by != ANCHORAGE_RULE)
    margin = np.full(n, np.inf)
    margin_name = np.full(n, "", dtype=object)
    for name in names:
        cdr = np.asarray(checks[name].cdr, dtype=np.float64)
        counts = ~(tuned & (set_by == name))
        if name == "rupture":
            counts &= ctx.a.grade_count <= 1
        elif name not in r.margin_checks:
            continue
        take = counts & (cdr < margin)
        margin = np.where(take, cdr, margin)
        margin_name = np.where(take, name, margin_name)
    low_cdr = margin < r.marginal_cdr
    top_grade = np.zeros(n, dtype=bool) if heaviest_grade is None else heaviest_grade
    spacing = [""] * n if closer_spacing is None else list(closer_spacing)
    closer = np.array([bool(w) for w in spacing], dtype=bool)
    long_l = (length > r.marginal_length_ratio * h + 1e-9) & (length > r.rule_length_min_m + 1e-9)
    long_l &= ~sizing.exhausted  # at the search limit the failing check says it all
    tall = h > r.marginal_height_m + 1e-9
    refer = out_of_scope | failed | sizing.exhausted
    margin_l, margin_name_l = margin.tolist(), margin_name.tolist()
    for i in np.flatnonzero(low_cdr & ~refer).tolist():
        reasons[i].append(
            f"{margin_name_l[i]} passes with little margin: CDR {cdr_text(margin_l[i])} < "
            f"{r.marginal_cdr:.2f}"
        )
    for i in np.flatnonzero(top_grade & ~refer).tolist():
        reasons[i].append("a layer needs the heaviest grade of its reinforcement family")
    for i in np.flatnonzero(closer & ~refer).tolist():
        reasons[i].append(spacing[i])
    for i in np.flatnonzero(long_l & ~refer).tolist():
        reasons[i].append(
            f"L = {length_l[i]:.1f} m is {ratio_l[i]:.2f}H > {r.marginal_length_ratio:g}H"
        )
    for i in np.flatnonzero(tall & ~out_of_scope).tolist():
        reasons[i].append(f"design height {h_l[i]:.1f} m > {r.marginal_height_m:g} m")
    marginal = ~refer & (low_cdr | top_grade | long_l | tall | closer)
    clear = ~refer & ~marginal
    for i in np.flatnonzero(clear).tolist():
        if np.isfinite(margin_l[i]):
            reasons[i].append(
                f"every check passes; least margin {margin_name_l[i]} CDR "
                f"{cdr_text(margin_l[i])} (at least {r.marginal_cdr:.2f})"
            )
        else:
            reasons[i].append("every check passes")
    _sizing_words(ctx, sizing, reasons, refer)
    verdict = np.where(refer, "refer", np.where(marginal, "marginal", "clear")).tolist()
    governing = np.where(out_of_scope, first_scope, governing).tolist()
    return Outcome(
        verdict, [tuple(x) for x in reasons], governing, min_cdr, margin_name.tolist(), margin
    )


def _sizing_words(ctx: ScreenContext, sizing: Sizing, reasons, refer: BoolArray) -> None:
    """What set L and the grade, and the detailing rules met, for every segment."""
    r = ctx.a.rules
    h = ctx.geom.design_height_m
    length_l, ratio_l = sizing.length_m.tolist(), (sizing.length_m / h).tolist()
    rule_l, minimum_l = ctx.geom.rule_length_m.tolist(), sizing.minimum_m.tolist()
    boost_l = sizing.grade_boost.tolist()
    embed_l = ctx.geom.embedment_m.tolist()
    for i, who in enumerate(sizing.set_by):
        if sizing.exhausted[i]:
            continue
        at = f"L = {length_l[i]:.1f} m ({ratio_l[i]:.2f}H)"
        if who == RULE_OF_THUMB:
            reasons[i].append(
                f"{at} by the rule of thumb max({r.rule_length_ratio:g}H, {r.rule_length_min_m:g} m)"
            )
        elif who == ANCHORAGE_RULE:
            reasons[i].append(
                f"{at} by the anchorage rule: Le >= {r.min_anchorage_m:g} m beyond the line "
                f"of maximum tension in every layer (rule of thumb {rule_l[i]:.1f} m)"
            )
        else:
            reasons[i].append(
                f"{at} set by {who}: the shortest length it passes, so its CDR is about "
                f"1.00 by construction (detailing minimum {minimum_l[i]:.1f} m)"
            )
        if boost_l[i]:
            steps = "step" if boost_l[i] == 1 else "steps"
            reasons[i].append(
                f"every layer {boost_l[i]} grade {steps} above the lightest that passes "
                f"internally, for {who}: no length up to {r.max_screen_length_ratio:g}H "
                "passes with the lightest grades"
            )
        if not refer[i]:
            reasons[i].append(
                f"detailing rules met: L >= {minimum_l[i]:.1f} m "
                f"(max({r.rule_length_ratio:g}H, {r.rule_length_min_m:g} m) and Le >= "
                f"{r.min_anchorage_m:g} m), embedment {embed_l[i]:.2f} m"
            )
