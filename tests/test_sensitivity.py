"""Sensitivity ranks the input the method says dominates first; Monte Carlo is seeded.

The ranking tests screen with the core checks only (``extra_checks=()``: sliding,
eccentricity, bearing, pullout, rupture) so that the premise rests on the formulas
cited below; the compound search has its own tests.

Corridors are invented test data. The expected rankings follow from the method's
formulas (METHOD.md), not from recorded engine output:

- bearing on a foundation of φ = 24°: Vesic's Nγ = 2(Nq + 1)tanφ with
  Nq = e^(π tanφ)tan²(45° + φ/2) is about 6.2 at 21°, 9.4 at 24° and 14.5 at 27°
  (Vesic 1973 / AASHTO Table 10.6.3.1.2a-1, from memory), so ±3° moves the bearing
  resistance by roughly -35 % / +55 %; every other input only moves the demand σv by a
  few per cent. The foundation φ must come first, flip the verdict and move L most.
- pullout of steel strips: the fill φ enters both the demand (Ka, hence T_max) and the
  resistance (F* falls to tanφ at depth), while the retained soil and the foundation do
  not enter pullout at all (AASHTO LRFD 11.10.6.2-3, from memory). With pullout governing
  and L held at the rule length, the fill φ moves the smallest CDR most.
"""

from __future__ import annotations

import numpy as np
import pytest

from screening import store
from screening.corridor.sensitivity import (
    INPUT_KEYS,
    draw_inputs,
    load_ranges,
    monte_carlo,
    segment_sensitivity,
)
from screening.engine import screen
from screening.model.errors import InputError


def _corridor(foundation: str, heights=(6.0,), reinforcement: str = "steel-strip"):
    segs = "".join(
        f"""
[[segment]]
id = "S-{k + 1:02d}"
wall = "S"
chainage_start_m = {20.0 * k}
chainage_end_m = {20.0 * (k + 1)}
height_start_m = {h}
height_end_m = {h}
"""
        for k, h in enumerate(heights)
    )
    text = f"""
schema = "wallscreen/1"
[corridor]
name = "Sensitivity test"
factor_set = "aashto-lrfd"
[defaults]
fill = "granular-wellgraded"
reinforcement = "{reinforcement}"
traffic = "none"
foundation = {foundation}
{segs}"""
    return store.loads(text, "s.toml")


CORE = ()
"""No extra checks: the core method only."""
WEAK = "{ unit_weight_kn_m3 = 19.0, friction_deg = 24.0 }"
FIRM = "{ unit_weight_kn_m3 = 20.0, friction_deg = 38.0 }"


def test_foundation_friction_dominates_a_bearing_governed_wall():
    c = _corridor(WEAK)
    assert screen(c, extra_checks=CORE).governing[0] == "bearing"  # the premise of the ranking
    ranked = segment_sensitivity(c, 0, extra_checks=CORE)
    top = ranked[0]
    assert top.key == "foundation_friction_deg"
    assert top.flips
    assert top.length_shift_m == max(s.length_shift_m for s in ranked)
    assert top.length_low_m > top.length_high_m  # weaker foundation, longer base


def test_fill_friction_dominates_a_pullout_governed_strip_wall():
    c = _corridor(FIRM)
    assert screen(c, extra_checks=CORE).governing[0] == "pullout"
    ranked = segment_sensitivity(c, 0, extra_checks=CORE)
    assert ranked[0].key == "fill_friction_deg"
    assert ranked[0].min_cdr_low < ranked[0].min_cdr_high  # lower φ, less pullout margin


def test_inputs_that_do_not_apply_are_left_out_and_a_deep_water_table_does_nothing():
    c = _corridor(FIRM)  # drained foundation (no cu), water table 20 m down (model default)
    ranked = {s.key: s for s in segment_sensitivity(c, 0, extra_checks=CORE)}
    assert "foundation_undrained_strength_kpa" not in ranked
    # C_wγ = 1 once the water is 1.5 B' or more below the base [METHOD §4, mem]: 18-22 m is far
    water = ranked["water_depth_m"]
    assert water.length_shift_m == 0.0 and water.cdr_shift == pytest.approx(0.0, abs=1e-12)


def test_ranges_preset_loads_and_names_only_known_inputs(tmp_path):
    ranges = load_ranges()
    assert set(ranges) <= set(INPUT_KEYS)
    assert ranges["fill_friction_deg"] > 0
    bad = tmp_path / "s.toml"
    bad.write_text("[range]\nfill_friction = 2.0\n")
    with pytest.raises(InputError, match="fill_friction_deg"):
        load_ranges(bad)


def test_monte_carlo_is_reproducible_and_sums_to_one():
    c = _corridor(WEAK, heights=(4.0, 6.0))
    a = monte_carlo(c, 40, seed=7, extra_checks=CORE)
    b = monte_carlo(c, 40, seed=7, extra_checks=CORE)
    np.testing.assert_array_equal(a.p_refer, b.p_refer)
    np.testing.assert_array_equal(a.length_mean_m, b.length_mean_m)
    np.testing.assert_allclose(a.p_refer + a.p_marginal + a.p_clear, 1.0)


def test_draws_have_the_promised_spread_and_limits():
    """σ = range/2 (presets/sensitivity.toml): the sample std of 4000 draws is within 5 %."""
    c = _corridor(FIRM)
    ranges = {"fill_friction_deg": 3.0, "surcharge_kpa": 5.0}
    drawn = draw_inputs(c, 4000, 3, ranges, np.array([0.0]))
    assert drawn["fill_friction_deg"].std() == pytest.approx(1.5, rel=0.05)
    assert drawn["fill_friction_deg"].mean() == pytest.approx(34.0, abs=0.1)
    assert drawn["surcharge_kpa"].min() >= 0.0  # cut at the physical limit
    assert np.isnan(drawn["foundation_undrained_strength_kpa"]).all()  # not applicable
    other = draw_inputs(c, 4000, 4, ranges, np.array([0.0]))
    assert not np.array_equal(drawn["fill_friction_deg"], other["fill_friction_deg"])


def test_monte_carlo_without_spread_gives_the_base_verdict_and_scope_refers_always():
    """Zero ranges: every draw is the file itself. A 13 m wall is outside screening
    (H > 12 m refers whatever the soils, METHOD §7), so P(refer) = 1 with any spread."""
    c = _corridor(FIRM, heights=(4.0, 13.0))
    base = screen(c)
    still = monte_carlo(c, 3, seed=1, ranges={k: 0.0 for k in INPUT_KEYS})  # every check
    for j, v in enumerate(base.verdict):
        assert {"clear": still.p_clear, "marginal": still.p_marginal, "refer": still.p_refer}[v][
            j
        ] == 1.0
    spread = monte_carlo(c, 30, seed=1, extra_checks=CORE)
    assert spread.p_refer[1] == 1.0
    assert spread.robust()[1]


def test_batched_sensitivity_equals_one_segment_at_a_time():
    """Screening is per segment, so putting every segment's variants in one engine call
    must give exactly what one call per segment gives."""
    from screening.corridor.sensitivity import corridor_sensitivity

    c = _corridor(WEAK, heights=(3.0, 6.0, 8.0))
    both = corridor_sensitivity(c, [0, 2], extra_checks=CORE)
    for i in (0, 2):
        assert both[i] == segment_sensitivity(c, i, extra_checks=CORE)


def test_an_input_left_at_its_own_value_changes_nothing():
    """Surcharge 0 kPa has its low end cut at 0: that variant is the segment itself and
    must screen exactly like it, every check included (compound search too). Guards
    against variants sharing state in the engine (it keys per-screen caches by id)."""
    c = _corridor(WEAK, heights=(4.0, 6.0))
    base = screen(c)
    for i in (0, 1):
        surcharge = next(
            s for s in segment_sensitivity(c, i, result=base) if s.key == "surcharge_kpa"
        )
        assert surcharge.low == 0.0
        assert surcharge.length_low_m == float(base.length_m[i])
        # the slip search starts from circles found for other rows of the same screen, so
        # its critical factor agrees within the search's tolerance, not to the last digit
        assert surcharge.min_cdr_low == pytest.approx(float(base.min_cdr[i]), rel=1e-3)
        assert surcharge.verdict_low == base.verdict[i]
