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
    assert any("by rule of thumb" in x for x in r.reasons[0])


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
