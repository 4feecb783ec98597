"""Properties of the length search and the verdict over generated segments (Hypothesis).

Physical sense (common practice, no source): a taller wall, a heavier surcharge or traffic
load, or a weaker soil never needs shorter reinforcement; every CDR is finite and positive;
the verdict is always one of the three.

Two limits of the method itself shape the generators, and are stated rather than hidden:
- Layers sit Sv/2 above the pad and then every Sv, so the top layer's depth below the wall
  top moves between Sv/2 and 1.5 Sv as H changes by less than Sv; a deeper top layer has
  more overburden and less pullout demand from traffic. Heights therefore grow by whole
  spacings here (the layers keep their depths from the top, new ones come in below), and
  the approach traffic class is left out of the height property, because its load itself
  falls with height by the AASHTO table.
- A permanent surcharge over the reinforced zone also confines the layers and weighs down
  the block. Without load factors (allowable stress), or with traffic on top, more dead
  surcharge can raise pullout and sliding CDRs; the surcharge property is therefore
  checked with LRFD factors (ES 1.50 driving, 0.75 resisting) and no traffic.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from screening.engine import screen
from screening.engine.samples import (
    ASD,
    DA1,
    GEOGRID,
    GRID,
    LRFD,
    STRIP,
    make_corridor,
    make_segment,
)
from screening.model import VERDICTS, Fill, Foundation, Soil

FAMILIES = st.sampled_from([STRIP, GRID, GEOGRID])
FACTOR_SETS = st.sampled_from([LRFD, ASD, DA1])


@st.composite
def segments(draw):
    fam = draw(FAMILIES)
    return make_segment(
        0,
        height_start_m=draw(st.floats(1.0, 11.0)),
        height_end_m=draw(st.floats(1.0, 11.0)),
        reinforcement=fam,
        spacing_m=fam.spacing_m,
        fill=Fill(
            unit_weight_kn_m3=draw(st.floats(18.0, 22.0)),
            friction_deg=draw(st.floats(30.0, 40.0)),
            uniformity_coefficient=draw(st.floats(1.5, 20.0)),
        ),
        retained=Soil(
            unit_weight_kn_m3=draw(st.floats(17.0, 21.0)), friction_deg=draw(st.floats(25.0, 36.0))
        ),
        foundation=Foundation(
            friction_deg=draw(st.floats(22.0, 38.0)),
            cohesion_kpa=draw(st.floats(0.0, 10.0)),
            water_depth_m=draw(st.floats(0.0, 20.0)),
        ),
        surcharge_kpa=draw(st.floats(0.0, 30.0)),
        traffic=draw(st.sampled_from(["none", "parallel", "approach", 5.0, 20.0])),
        backslope_deg=draw(st.sampled_from([0.0, 0.0, 10.0, 18.43])),
        toe_slope_deg=draw(st.sampled_from([0.0, 18.43, 26.57])),
        structure=draw(st.sampled_from(["wall", "abutment"])),
    )


SETTINGS = settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])


def _lengths(base, variants, fs):
    """Screen the variants of one segment side by side (one vectorised call)."""
    segs = [replace(base, id=f"V{i}", **v) for i, v in enumerate(variants)]
    r = screen(make_corridor(segs, fs), extra_checks=())
    return r.length_m, r


@SETTINGS
@given(
    segments(), FACTOR_SETS, st.integers(1, 4), st.sampled_from(["none", "parallel", 10.0, 20.0])
)
def test_length_never_decreases_with_height(seg, fs, k, traffic) -> None:
    """Design heights H and H + k Sv (level toe, plain wall: embedment 0.6 m below 11.4 m)."""
    seg = replace(seg, traffic=traffic, toe_slope_deg=0.0, structure="wall")
    dh = k * seg.spacing_m
    h = min(max(seg.height_start_m, seg.height_end_m), 11.3 - dh)
    variants = [
        {"height_start_m": h, "height_end_m": h},
        {"height_start_m": h + dh, "height_end_m": h + dh},
    ]
    lengths, r = _lengths(seg, variants, fs)
    assert r.design_height_m[1] - r.design_height_m[0] == pytest.approx(k * seg.spacing_m)
    assert lengths[1] >= lengths[0] - 1e-9


@SETTINGS
@given(segments(), st.floats(0.5, 40.0))
def test_length_never_decreases_with_surcharge(seg, dq) -> None:
    seg = replace(seg, traffic="none")
    lengths, _ = _lengths(seg, [{}, {"surcharge_kpa": seg.surcharge_kpa + dq}], LRFD)
    assert lengths[1] >= lengths[0] - 1e-9


@SETTINGS
@given(segments(), FACTOR_SETS, st.floats(0.0, 30.0), st.floats(0.5, 30.0))
def test_length_never_decreases_with_traffic(seg, fs, q, dq) -> None:
    lengths, _ = _lengths(seg, [{"traffic": q}, {"traffic": q + dq}], fs)
    assert lengths[1] >= lengths[0] - 1e-9


@SETTINGS
@given(
    segments(),
    FACTOR_SETS,
    st.floats(0.5, 6.0),
    st.sampled_from(["fill", "retained", "foundation"]),
)
def test_length_never_decreases_as_friction_falls(seg, fs, dphi, which) -> None:
    soil = getattr(seg, which)
    weaker = replace(soil, friction_deg=max(soil.friction_deg - dphi, 20.0))
    lengths, _ = _lengths(seg, [{}, {which: weaker}], fs)
    assert lengths[1] >= lengths[0] - 1e-9


@SETTINGS
@given(st.lists(segments(), min_size=1, max_size=6), FACTOR_SETS)
def test_cdrs_finite_positive_and_verdicts_known(segs, fs) -> None:
    segs = [replace(s, id=f"P{i}") for i, s in enumerate(segs)]
    r = screen(make_corridor(segs, fs), extra_checks=())
    for c in r.checks.values():
        assert np.all(np.isfinite(c.cdr)) and np.all(c.cdr > 0)
        assert np.all(np.isfinite(c.demand)) and np.all(np.isfinite(c.capacity))
    assert np.all(np.isfinite(r.min_cdr)) and np.all(r.min_cdr > 0)
    assert set(r.verdict) <= set(VERDICTS)
    assert all(r.reasons)
