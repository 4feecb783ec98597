"""Quantities against hand calculation.

The screen supplies L and the grade of each layer (read from the result, not recorded);
everything else is worked by hand below from the geometry: trapezoid areas, the layer
rule "layer i from the bottom runs where H >= (i + 1)·Sv" (the engine's layout, METHOD §1),
strip and bar sections, steel density 7850 kg/m3 [mem, EN 1991-1-1 Table A.4] and the
unit rates. Corridors are invented test data.
"""

from __future__ import annotations

import math

import pytest

from screening import store
from screening.corridor.quantities import Rates, corridor_quantities, layer_runs_m, load_rates
from screening.engine import screen
from screening.model.errors import InputError

RATES = Rates(
    face_m2=100.0,
    levelling_pad_m=10.0,
    select_fill_m3=20.0,
    steel_kg=2.0,
    geosynthetic_m2=3.0,
    geosynthetic_m2_per_kn_m=0.05,
    currency="test",
)


def _corridor(reinforcement: str, h0: float, h1: float, length: float, extra: str = ""):
    text = f"""
schema = "wallscreen/1"
[corridor]
name = "Quantities test"
factor_set = "aashto-lrfd"
[defaults]
fill = "granular-wellgraded"
reinforcement = "{reinforcement}"
traffic = "none"
{extra}
[[segment]]
id = "Q-01"
wall = "Q"
chainage_start_m = 100.0
chainage_end_m = {100.0 + length}
height_start_m = {h0}
height_end_m = {h1}
"""
    c = store.loads(text, "q.toml")
    return c, screen(c)


def _grades_bottom_up(result, corridor):
    """The grade the screen chose for each layer, bottom layer first."""
    c = int(result.layers.mask[0].sum())
    idx = result.layers.grade_index[0, :c][::-1]
    grades = corridor.segments[0].reinforcement.grades
    return [grades[int(k)] for k in idx]


def test_steel_strips_constant_height():
    """h = 4.0 m over 20 m. Embedment max(0.6, H/20): H/20 = 4.21/20 < 0.6, so d = 0.6 and
    H = 4.6 m; layers floor(4.6/0.75) = 6, all running the full 20 m."""
    c, r = _corridor("steel-strip", 4.0, 4.0, 20.0)
    q = corridor_quantities(c, r, RATES).segments[0]
    big_l = float(r.length_m[0])
    grades = _grades_bottom_up(r, c)
    assert len(grades) == 6 and q.layers == 6
    assert q.face_area_m2 == pytest.approx(80.0)
    assert q.facing_area_m2 == pytest.approx(4.6 * 20.0)
    assert q.levelling_pad_m == 20.0
    assert q.select_fill_m3 == pytest.approx(big_l * 4.6 * 20.0)
    count = sum(math.ceil(g.elements_per_m * 20.0 - 1e-9) for g in grades)
    assert q.strip_count == count
    assert q.strip_length_m == pytest.approx(count * big_l)
    assert q.steel_kg == pytest.approx(count * big_l * 0.050 * 0.004 * 7850.0)
    assert q.cost["facing"] == pytest.approx(92.0 * 100.0)
    assert q.cost["levelling pad"] == pytest.approx(200.0)
    assert q.cost["select fill"] == pytest.approx(big_l * 92.0 * 20.0)
    assert q.cost["steel"] == pytest.approx(q.steel_kg * 2.0)
    assert q.geosynthetic_m2 == {} and q.cost["geosynthetic"] == 0.0


def test_geogrid_tapering_segment_has_fewer_layers_at_its_low_end():
    """h 2.0 -> 5.0 m over 30 m, Sv 0.6 m, d 0.6 m: H 2.6 -> 5.6 m. Layer i runs where
    H >= 0.6(i + 1): layers 0-3 (0.6-2.4 m) the full 30 m; layer 4 (3.0 m) runs
    30·(5.6-3.0)/3.0 = 26 m, then 20, 14, 8 and 2 m: 190 m of layer in all."""
    c, r = _corridor("geogrid", 2.0, 5.0, 30.0)
    q = corridor_quantities(c, r, RATES).segments[0]
    big_l = float(r.length_m[0])
    runs = [30.0, 30.0, 30.0, 30.0, 26.0, 20.0, 14.0, 8.0, 2.0]
    grades = _grades_bottom_up(r, c)
    assert len(grades) == 9
    expected: dict[str, float] = {}
    for g, run in zip(grades, runs, strict=True):
        expected[g.name] = expected.get(g.name, 0.0) + big_l * run * g.coverage_ratio
    assert q.geosynthetic_m2 == pytest.approx(expected)
    assert sum(q.geosynthetic_m2.values()) == pytest.approx(big_l * 190.0)  # Rc = 1 for geogrids
    cost = sum(
        big_l * run * (3.0 + 0.05 * g.ultimate_strength_kn_m)
        for g, run in zip(grades, runs, strict=True)
    )
    assert q.cost["geosynthetic"] == pytest.approx(cost)
    assert q.face_area_m2 == pytest.approx(0.5 * (2.0 + 5.0) * 30.0)
    assert q.select_fill_m3 == pytest.approx(big_l * 0.5 * (2.6 + 5.6) * 30.0)
    assert q.steel_kg == 0.0 and q.strip_count == 0


def test_bar_mats_mass_by_hand():
    """h = 3.0 m over 10 m, Sv 0.6: H = 3.6 m, 6 layers of 10 m. Per layer: longitudinal
    bars_per_m·10·L·π d²/4, transverse bars every 0.3 m along L (floor(L/0.3) + 1 of
    them), each Rc·10 m long, 9.5 mm; × 7850 kg/m3."""
    c, r = _corridor("steel-grid", 3.0, 3.0, 10.0)
    q = corridor_quantities(c, r, RATES).segments[0]
    big_l = float(r.length_m[0])
    grades = _grades_bottom_up(r, c)
    assert len(grades) == 6
    mass = 0.0
    for g in grades:
        mass += g.bars_per_m * 10.0 * big_l * math.pi / 4 * (g.bar_diameter_mm / 1000) ** 2
        mass += (
            (math.floor(big_l / 0.3 + 1e-9) + 1) * g.coverage_ratio * 10.0 * math.pi / 4 * 0.0095**2
        )
    assert q.steel_kg == pytest.approx(mass * 7850.0)


def test_layer_runs_rule():
    import numpy as np

    runs = layer_runs_m(np.array([1.0]), np.array([3.0]), np.array([1.0]), np.array([10.0]), 3)
    # layer 0 always; layer 1 needs H >= 2: half of the run; layer 2 needs 3: none
    assert runs.tolist() == [[10.0, 5.0, 0.0]]


def test_totals_are_sums_of_segments():
    c, r = _corridor("steel-strip", 2.0, 6.0, 40.0)
    q = corridor_quantities(c, r, RATES)
    assert q.total("steel_kg") == pytest.approx(sum(s.steel_kg for s in q.segments))
    assert q.total("cost_total") == pytest.approx(sum(q.cost().values()))


def test_shipped_rates_load_and_say_they_are_placeholders():
    rates = load_rates()
    assert rates.placeholder is True
    assert rates.face_m2 > 0 and rates.steel_kg > 0


def test_bad_rates_files_give_located_messages(tmp_path):
    p = tmp_path / "rates.toml"
    p.write_text(
        "[rates]\nface_m2 = 1\nlevelling_pad_m = 1\nselect_fill_m3 = 1\nsteel_kg = 1\ngeosynthetic_m2 = 1\nfacing_m2 = 3\n"
    )
    with pytest.raises(InputError, match=r"rates.toml:7:1: \[rates\] facing_m2: .*face_m2"):
        load_rates(p)
    p.write_text(
        "[rates]\nface_m2 = -1\nlevelling_pad_m = 1\nselect_fill_m3 = 1\nsteel_kg = 1\ngeosynthetic_m2 = 1\n"
    )
    with pytest.raises(InputError, match=r"rates.toml:2:\d+: \[rates\] face_m2: must be"):
        load_rates(p)
    p.write_text(
        '[rates]\nface_m2 = 1\nlevelling_pad_m = 1\nselect_fill_m3 = 1\nsteel_kg = 1\ngeosynthetic_m2 = 1\n[rates.grade]\n"PET 55 kN/m" = 9.5\n'
    )
    assert load_rates(p).grade_m2 == {"PET 55 kN/m": 9.5}


def test_a_screen_of_another_corridor_is_refused():
    c, r = _corridor("steel-strip", 4.0, 4.0, 20.0)
    other, r2 = _corridor("steel-strip", 4.0, 4.0, 20.0)
    import dataclasses

    renamed = dataclasses.replace(other, segments=(dataclasses.replace(other.segments[0], id="X"),))
    with pytest.raises(InputError, match="does not belong to this corridor"):
        corridor_quantities(renamed, r, RATES)


def test_result_table_is_builtin_numbers():
    """numpy scalars are not TOML (tomli-w refuses them): the results table must be plain."""
    import tomli_w

    c, r = _corridor("geogrid", 2.0, 5.0, 30.0)
    row = corridor_quantities(c, r, RATES).segments[0].as_result()
    assert all(type(v) in (int, float) for v in row.values())
    assert "geosynthetic_m2" in row and "steel_kg" not in row
    tomli_w.dumps({"result": row})
