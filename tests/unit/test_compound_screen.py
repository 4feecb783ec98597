"""The compound, global and seismic checks inside a whole screen (engine plug-ins).

Corridors are invented test data. Expectations are physical sense (common practice, no
source) or the rules of METHOD sections 3, 6 and 7, named beside each test.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from screening import store
from screening.engine import screen
from screening.engine.arrays import build_arrays
from screening.engine.checks.internal import prepare
from screening.engine.checks.seismic import seismic_checks
from screening.engine.context import build_context


def corridor(foundation: str, height=6.0, seismic_kh=0.0, backslope=0.0, extra=""):
    text = f"""
schema = "wallscreen/1"
[corridor]
name = "Compound plug-in test"
factor_set = "aashto-lrfd"
[defaults]
fill = "granular-wellgraded"
reinforcement = "steel-strip"
traffic = "none"
foundation = {foundation}
retained = {{ unit_weight_kn_m3 = 19.0, friction_deg = 30.0 }}
seismic_kh = {seismic_kh}
backslope_deg = {backslope}
{extra}
[[segment]]
id = "T-01"
wall = "Test wall"
chainage_start_m = 0.0
chainage_end_m = 20.0
height_start_m = {height}
height_end_m = {height}
"""
    return store.loads(text, "t.toml")


SOFT_CLAY = "{ unit_weight_kn_m3 = 17.0, friction_deg = 22.0, undrained_strength_kpa = 15.0, water_depth_m = 0.0 }"
DENSE_SAND = "{ unit_weight_kn_m3 = 20.0, friction_deg = 38.0 }"


def test_wall_on_soft_clay_is_referred_for_global_stability():
    """Physical sense (common practice, no source): cu = 15 kPa under a 6 m wall cannot carry
    it; the screen refers the segment and says the overall (global) stability fails."""
    r = screen(corridor(SOFT_CLAY))
    assert r.verdict[0] == "refer"
    assert r.checks["global"].cdr[0] < 1.0
    assert any(reason.startswith("global CDR") for reason in r.reasons[0])


def test_same_wall_on_dense_sand_passes_global_stability():
    """Physical sense: on dense sand (phi' 38 deg) neither slip family fails."""
    r = screen(corridor(DENSE_SAND))
    assert r.checks["global"].cdr[0] >= 1.0
    assert r.checks["compound"].cdr[0] >= 1.0
    assert not any(reason.startswith(("global", "compound")) for reason in r.reasons[0])


def test_sizing_lengthens_the_wall_until_compound_passes():
    """METHOD section 7: L is the shortest that passes every check, compound included."""
    c = corridor("{ unit_weight_kn_m3 = 19.0, friction_deg = 31.0 }")
    core = screen(c, extra_checks=())
    full = screen(c)
    assert full.length_m[0] >= core.length_m[0]
    if full.verdict[0] != "refer":
        assert full.checks["compound"].cdr[0] >= 1.0
        assert full.checks["global"].cdr[0] >= 1.0


def test_result_carries_the_critical_circles():
    """DESIGN.md: the JSON gains compound and global checks; the circle is kept in extras."""
    r = screen(corridor(DENSE_SAND))
    for name in ("compound", "global", "seismic"):
        assert name in r.checks
    for fam in ("compound", "global"):
        x, y, rad = (r.extras[f"{fam}_circle_{k}_m"][0] for k in ("x", "y", "r"))
        assert np.isfinite([x, y, rad]).all()
        assert rad > 0 and y > 0  # the centre lies above the base of the wall
        assert r.extras[f"{fam}_converged"][0]
    assert "circle from" in r.checks["compound"].detail[0]


def test_mononobe_okabe_without_solution_refers_the_segment():
    """METHOD section 3: phi - psi - beta < 0 refers the segment. Retained phi 30 deg under a
    2H:1V backslope (26.57 deg) with kh0 = 0.3 on a wall (kh = 0.15, psi = 8.5 deg)."""
    r = screen(corridor(DENSE_SAND, seismic_kh=0.3, backslope=26.565))
    assert r.verdict[0] == "refer"
    assert r.checks["seismic"].cdr[0] == 0.0
    assert any("Mononobe-Okabe has no solution" in reason for reason in r.reasons[0])


@pytest.mark.parametrize(
    "foundation", [DENSE_SAND, "{ unit_weight_kn_m3 = 19.0, friction_deg = 30.0 }"]
)
def test_seismic_coefficient_never_raises_a_cdr_at_a_given_length(foundation):
    """Physical sense (common practice, no source): at a given L, a larger kh0 never raises
    any Extreme Event I capacity/demand ratio, the pseudo-static slip search included."""
    base = corridor(foundation)
    kh_values = (0.05, 0.1, 0.2, 0.3)
    segs = tuple(
        dataclasses.replace(base.segments[0], id=f"K-{i}", seismic_kh=k)
        for i, k in enumerate(kh_values)
    )
    c = dataclasses.replace(base, segments=segs)
    a = build_arrays(c)
    ctx = build_context(a)
    ctx = dataclasses.replace(ctx, internal=prepare(ctx))
    length = np.full(len(segs), 5.0)
    checks = seismic_checks(ctx, length)
    for key in ("sliding", "eccentricity", "bearing", "pullout", "rupture", "overall"):
        cdr = checks[key][2]
        assert np.all(np.diff(cdr) <= 1e-9), key


def test_static_segments_have_no_seismic_demand():
    """kh0 = 0: the seismic entry says so and never governs."""
    r = screen(corridor(DENSE_SAND))
    assert r.checks["seismic"].cdr[0] == pytest.approx(99.0)
    assert "kh0 = 0" in r.checks["seismic"].detail[0]
    assert r.governing[0] != "seismic"


def test_slip_results_do_not_depend_on_the_batch():
    """A segment's circle and CDR are the same screened alone, in a corridor, or in chunks
    (each Bishop iteration stops on its own convergence; common practice for reproducible
    results, no source)."""
    from screening.engine import screen_iter

    base = corridor(DENSE_SAND)
    segs = tuple(
        dataclasses.replace(base.segments[0], id=f"B-{i}", height_start_m=h, height_end_m=h)
        for i, h in enumerate((3.0, 5.0, 7.0, 9.0))
    )
    c = dataclasses.replace(base, segments=segs)
    whole = screen(c)
    gen = screen_iter(c, chunk_size=1)
    while True:
        try:
            next(gen)
        except StopIteration as stop:
            parts = stop.value
            break
    for name in ("compound", "global"):
        np.testing.assert_allclose(whole.checks[name].cdr, parts.checks[name].cdr, rtol=1e-12)


def test_sizing_and_the_reported_check_agree():
    """METHOD section 7: the chosen L passes every check unless the search ran out of
    lengths, so the slip checks reported at L agree with what sizing saw there."""
    from screening.model import presets

    r = screen(store.load(presets.demo_corridor_path()))
    exhausted = np.asarray(r.extras["search_exhausted"], dtype=bool)
    for name in ("compound", "global"):
        cdr = r.checks[name].cdr
        assert np.all((cdr >= 1.0 - 1e-9) | exhausted), name
