"""Verdict rules of METHOD section 7 with thresholds from Rules (common practice, no source)."""

from __future__ import annotations

from dataclasses import replace

from screening.engine import screen
from screening.engine.samples import make_corridor, make_segment
from screening.model import Rules


def test_plain_wall_is_clear_with_reasons() -> None:
    r = screen(make_corridor([make_segment(0)]), extra_checks=())
    assert r.verdict == ["clear"]
    assert any(x.startswith("every check passes") for x in r.reasons[0])
    assert any("by the rule of thumb" in x for x in r.reasons[0])


def test_tall_wall_is_marginal() -> None:
    r = screen(
        make_corridor([make_segment(0, height_start_m=10.0, height_end_m=10.0)]), extra_checks=()
    )
    assert r.verdict == ["marginal"]
    assert any(x.startswith("design height 10.6 m > 10 m") for x in r.reasons[0])


def test_long_reinforcement_is_marginal() -> None:
    r = screen(make_corridor([make_segment(0, backslope_deg=26.57)]), extra_checks=())
    assert r.verdict[0] in ("marginal", "refer")
    assert any("> 0.9H" in x for x in r.reasons[0])


def test_thresholds_come_from_rules() -> None:
    corridor = make_corridor([make_segment(0, height_start_m=10.0, height_end_m=10.0)])
    relaxed = replace(corridor, rules=Rules(marginal_height_m=11.0))
    assert screen(relaxed, extra_checks=()).verdict == ["clear"]
    strict = replace(corridor, rules=Rules(marginal_cdr=50.0))
    r = screen(strict, extra_checks=())
    assert r.verdict == ["marginal"] and any("< 50" in x for x in r.reasons[0])


def test_minimum_length_alone_does_not_make_a_low_wall_marginal() -> None:
    """A 1.5 m wall gets the 2.4 m minimum (> 0.9H) by rule, not by the checks."""
    r = screen(
        make_corridor([make_segment(0, height_start_m=1.5, height_end_m=1.5)]), extra_checks=()
    )
    assert r.length_m[0] == 2.4
    assert not any("> 0.9H" in x for x in r.reasons[0])


def test_grade_tuned_internal_margin_alone_is_not_marginal() -> None:
    """Screening picks, per layer, the lightest strip grade that carries T_max and passes
    pullout, so the steel pullout CDR sits just above 1.0 by construction; that alone is no
    thin margin (our refinement of METHOD §7, common practice, no source)."""
    seg = make_segment(0, height_start_m=5.0, height_end_m=5.0, traffic="parallel")
    r = screen(make_corridor([seg]), extra_checks=())
    assert r.checks["pullout"].cdr[0] < 1.10
    assert r.length_m[0] == r.rule_length_m[0]
    assert r.verdict == ["clear"]


def test_heaviest_grade_needed_is_marginal() -> None:
    """A layer that needs the top grade of its family leaves no room: marginal (ours)."""
    from screening.engine.samples import STRIP

    light = replace(STRIP, grades=STRIP.grades[:2])  # 2 and 3 strips/m only
    seg = make_segment(
        0, height_start_m=9.0, height_end_m=9.0, reinforcement=light, surcharge_kpa=80.0
    )
    r = screen(make_corridor([seg]), extra_checks=())
    assert r.verdict[0] in ("marginal", "refer")
    assert any("heaviest grade" in x for x in r.reasons[0])
    # A family of one grade chose nothing: it is judged by its rupture CDR instead.
    one = replace(STRIP, grades=STRIP.grades[-1:])
    r1 = screen(make_corridor([make_segment(0, reinforcement=one)]), extra_checks=())
    assert not any("heaviest grade" in x for x in r1.reasons[0])


def test_backslope_steeper_than_retained_friction_is_referred() -> None:
    """A slope steeper than the friction angle of its soil is not stable on its own
    (infinite-slope limit, F = tanφ/tanβ < 1; Taylor 1948 and any soil mechanics text)."""
    from screening.model import Soil

    seg = make_segment(0, backslope_deg=20.0, retained=Soil(19.0, 18.0))
    r = screen(make_corridor([seg]), extra_checks=())
    assert r.verdict == ["refer"] and r.governing == ["backslope"]


def test_lengthened_wall_is_judged_by_its_length_not_its_sized_cdr() -> None:
    """When checks lengthen L, the check that set it passes just above 1.0 by construction;
    the verdict then hangs on L/H (Rules.marginal_length_ratio), not on that CDR."""
    r = screen(
        make_corridor([make_segment(0, surcharge_kpa=40.0, traffic="approach")]), extra_checks=()
    )
    if r.length_m[0] > r.rule_length_m[0] + 1e-9:
        assert not any("little margin" in x for x in r.reasons[0])
        assert any("the shortest length it passes" in x for x in r.reasons[0])
