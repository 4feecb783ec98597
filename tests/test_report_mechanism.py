"""The HTML report draws the mechanism of each referred or marginal segment that has one,
as an inline vector figure with its upper-bound caption (our own report layout, not an
engineering fact; the factor is checked in tests/validation/test_mechanism_*.py)."""

from __future__ import annotations

import dataclasses
from pathlib import Path

from screening import store
from screening.engine import screen
from screening.engine.mechanism.check import run_mechanism, with_mechanism
from screening.model.presets import demo_corridor_path
from screening.report import write_report


def test_figure_per_segment_with_a_mechanism(tmp_path: Path) -> None:
    demo = store.load(demo_corridor_path())
    corridor = dataclasses.replace(
        demo, segments=tuple(s for s in demo.segments if s.id in ("WL-01", "WL-02", "R-06"))
    )
    result = screen(corridor)
    mech = run_mechanism(corridor, result, workers=1, nodes=80, coarse_nodes=40)
    out = tmp_path / "r.html"
    write_report(corridor, with_mechanism(result, mech), out, sensitivity=False)
    html = out.read_text()
    assert html.count('<svg xmlns="http://www.w3.org/2000/svg"') == 2  # WL-01 and R-06
    assert html.count("upper bound (unsafe side)") >= 2
    assert 'stroke="#c0392b"' in html  # the mechanism's lines
    plain = tmp_path / "plain.html"
    write_report(corridor, result, plain, sensitivity=False)
    text = plain.read_text()  # its other figures are SVG too (class "fig"), but none a mechanism
    assert '<svg xmlns="http://www.w3.org/2000/svg"' not in text
    assert 'stroke="#c0392b"' not in text and "upper bound (unsafe side)" not in text
