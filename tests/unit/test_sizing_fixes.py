"""Sizing that fixes what fails, and numbers that mean what they say.

Checks of the engine's own rules (common practice, no source): a CDR is capacity / demand of
the row shown; a check that is not monotonic in L is scanned before it is bisected; where no
length passes, heavier grades and then a closer spacing are tried and said in words; the
anchorage rule Le >= 0.9 m (AASHTO 11.10.6.3.2, from memory) is met by sizing, not by a cap
on the pullout CDR.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from screening import store
from screening.engine import screen
from screening.engine.context import ExtraCheck
from screening.engine.result import CDR_CAP, cdr_text
from screening.engine.samples import make_corridor, make_segment
from screening.model import Grade, Reinforcement

DEMO = Path(__file__).resolve().parents[2] / "presets" / "demo-corridor.toml"


def test_every_reported_cdr_is_capacity_over_demand() -> None:
    """On the demo corridor, every check row of every segment: cdr = capacity / demand."""
    r = screen(store.load(DEMO))
    for name, ch in r.checks.items():
        drives = ch.demand > 1e-9
        want = np.minimum(ch.capacity / np.where(drives, ch.demand, 1.0), CDR_CAP)
        np.testing.assert_allclose(ch.cdr[drives], want[drives], rtol=1e-9, err_msg=name)
        assert all(ch.case[i] for i in np.flatnonzero(drives)), f"{name}: a row without its case"


def test_a_cdr_below_one_never_reads_one() -> None:
    """Cut, never rounded up: 0.996 reads 0.99 and 1.096 reads 1.09 (below 1.10)."""
    assert cdr_text(0.996) == "0.99"
    assert cdr_text(1.096) == "1.09"
    assert cdr_text(1.0) == "1.00"


def test_the_anchorage_rule_sets_the_minimum_length_not_the_pullout_cdr() -> None:
    """Le >= 0.9 m in every layer is met by L (AASHTO 11.10.6.3.2, from memory); the pullout
    CDR is then capacity / demand and may be far above 1."""
    r = screen(make_corridor([make_segment(0, height_start_m=3.0, height_end_m=3.0)]))
    seg = r.segment(0)
    le = seg.length_m - np.array([layer.active_length_m for layer in seg.layers])
    assert np.all(le >= 0.9 - 1e-9)
    assert any("detailing rules met" in x for x in seg.reasons)


def _windowed(low: float, high: float) -> ExtraCheck:
    """A check that passes only for L in [low * H, high * H]: not monotonic in L."""

    def evaluate(ctx, length_m):
        ratio = length_m / ctx.geom.design_height_m
        cdr = np.where((ratio >= low - 1e-9) & (ratio <= high + 1e-9), 1.2, 0.8)
        return np.ones(ctx.n), cdr, cdr

    return ExtraCheck("window", evaluate)


def test_a_check_not_monotonic_in_length_is_scanned_then_bisected() -> None:
    """The check passes between 0.95H and 1.0H only: bisection from the rule length to 1.2H
    would miss the window; the scan finds it and the bisection finds its shortest length."""
    corridor = make_corridor([make_segment(0)])
    r = screen(corridor, extra_checks=(_windowed(0.95, 1.0),))
    h = r.design_height_m[0]
    assert r.verdict[0] != "refer", r.reasons[0]
    assert 0.95 * h - 1e-9 <= r.length_m[0] < 0.95 * h + 0.1
    assert r.length_set_by[0] == "window"


def _needs_grade(steps: int) -> ExtraCheck:
    def evaluate(ctx, length_m):
        cdr = np.where(ctx.boost >= steps, 1.1, 0.9)
        return np.ones(ctx.n), cdr, cdr

    return ExtraCheck("compound", evaluate)


def test_heavier_grades_are_tried_when_no_length_passes() -> None:
    """A compound check that no length passes with the lightest grades but passes two grade
    steps up: sizing raises every layer two steps and says so."""
    r = screen(make_corridor([make_segment(0)]), extra_checks=(_needs_grade(2),))
    assert int(r.grade_boost[0]) == 2
    assert r.verdict[0] != "refer"
    assert any("2 grade steps above the lightest" in x for x in r.reasons[0])


def test_a_closer_spacing_is_tried_when_the_heaviest_grade_cannot_carry() -> None:
    """A weak geotextile family (two grades) on a 3 m wall: no grade carries the deepest
    layer at the family's 0.6 m, a closer spacing does; the segment is at best marginal and
    the words say the spacing changed."""
    weak = Reinforcement(
        material="geotextile",
        kind="extensible",
        grades=(
            Grade("T20", ultimate_strength_kn_m=20.0),
            Grade("T30", ultimate_strength_kn_m=30.0),
        ),
        spacing_m=0.6,
        scale_effect_alpha=0.6,
        rf_installation=1.3,
        rf_creep=2.0,
        rf_durability=1.1,
        id="weak-geotextile",
    )
    seg = make_segment(0, height_start_m=3.0, height_end_m=3.0, reinforcement=weak)
    r = screen(make_corridor([seg]))
    assert r.verdict[0] == "marginal", r.reasons[0]
    assert float(r.extras["spacing_m"][0]) < 0.6
    assert any("closer than the family's" in x for x in r.reasons[0])


@pytest.mark.parametrize("factor_set", ["aashto-lrfd", "asd"])
def test_the_demo_is_a_realistic_mix(factor_set) -> None:
    """The invented demo scenario: most ordinary walls clear, the referred ones referred for
    what the scenario put there (soft or weak alluvium, water, marginal fill, height)."""
    from screening.model.presets import load_presets

    corridor = store.load(DEMO)
    r = screen(corridor, factor_set=load_presets().factor_sets[factor_set])
    counts = r.counts()
    assert counts["clear"] > counts["marginal"]
    assert counts["clear"] >= len(r) // 2
    scenario = {"EL-02", "EL-03", "EL-04", "EA-01", "ER-01", "ER-02", "ER-03", "R-06"}
    referred = {i for i, v in zip(r.ids, r.verdict, strict=True) if v == "refer"}
    assert referred <= scenario
