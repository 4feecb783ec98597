"""The corridor store: reading the schema of DESIGN.md, writing it back, saving safely.

Round trips are checked value for value (``load(dumps(x)) == x``); the layout checks read
the written text with ``tomllib`` (the standard library's TOML reader) rather than with our
own reader, so a mistake in one cannot hide a mistake in the other.
"""

from __future__ import annotations

import dataclasses
import os
import tomllib
from pathlib import Path

import numpy as np
import pytest

from screening import model, store
from screening.model.errors import InputError
from screening.model.presets import demo_corridor_path, load_presets
from screening.model.validate import SEGMENT_FIELDS, check_segment, coerce_field
from screening.store.toml_layout import to_builtin

DESIGN_EXAMPLE = """
schema = "wallscreen/1"

[corridor]
name = "Example approach, east side"
factor_set = "aashto-lrfd"
design_life_years = 100

[defaults]
fill = "granular-wellgraded"
retained = { unit_weight_kn_m3 = 19.0, friction_deg = 30.0 }
foundation = { unit_weight_kn_m3 = 19.0, friction_deg = 30.0, cohesion_kpa = 0.0, water_depth_m = 20.0 }
reinforcement = "steel-strip"
spacing_m = 0.75
surcharge_kpa = 0.0
traffic = "approach"
backslope_deg = 0.0
toe_slope_deg = 0.0
seismic_kh = 0.0

[[segment]]
id = "E-01"
wall = "East approach, left"
structure = "wall"
chainage_start_m = 1000.0
chainage_end_m = 1030.0
height_start_m = 2.0
height_end_m = 4.5
"""


@pytest.fixture(scope="module")
def presets():
    return load_presets()


@pytest.fixture(scope="module")
def example(presets) -> model.Corridor:
    return store.loads(DESIGN_EXAMPLE, "example.toml", presets)


def _segment_text(extra: str, sid: str = "E-02", start: float = 1030.0) -> str:
    return (
        f'\n[[segment]]\nid = "{sid}"\nwall = "East approach, left"\n'
        f"chainage_start_m = {start}\nchainage_end_m = {start + 30}\n"
        f"height_start_m = 4.5\nheight_end_m = 6.0\n{extra}\n"
    )


def test_design_example_reads_as_written(example, presets) -> None:
    c = example
    assert c.name == "Example approach, east side"
    assert c.factor_set is presets.factor_sets["aashto-lrfd"]
    assert c.design_life_years == 100.0
    (seg,) = c.segments
    assert seg.fill is presets.fills["granular-wellgraded"]
    assert seg.reinforcement is presets.reinforcement["steel-strip"]
    assert seg.retained == model.Soil(19.0, 30.0, 0.0)
    assert seg.foundation == model.Foundation(19.0, 30.0, 0.0, None, 20.0, False)
    assert (seg.traffic, seg.spacing_m, seg.structure) == ("approach", 0.75, "wall")
    assert seg.exposed_height_m == 4.5 and seg.length_along_m == 30.0


def test_design_example_round_trip(example, presets) -> None:
    assert store.loads(store.dumps(example, presets=presets), "x", presets) == example


def test_inline_fill_from_a_preset_keeps_its_id_and_writes_only_the_change(presets) -> None:
    text = DESIGN_EXAMPLE + _segment_text(
        'fill = { preset = "granular-wellgraded", friction_deg = 32.0 }'
    )
    c = store.loads(text, "x", presets)
    fill = c.segments[1].fill
    base = presets.fills["granular-wellgraded"]
    assert fill == dataclasses.replace(base, friction_deg=32.0)
    written = tomllib.loads(store.dumps(c, presets=presets))
    assert written["segment"][1]["fill"] == {"preset": "granular-wellgraded", "friction_deg": 32.0}
    assert "fill" not in written["segment"][0]  # same as [defaults]
    assert store.loads(store.dumps(c, presets=presets), "x", presets) == c


def test_inline_fill_without_preset_takes_model_defaults(presets) -> None:
    """Keys an inline table leaves out come from screening.model's defaults."""
    text = DESIGN_EXAMPLE + _segment_text(
        "fill = { unit_weight_kn_m3 = 20.0, friction_deg = 34.0 }"
    )
    fill = store.loads(text, "x", presets).segments[1].fill
    assert fill == model.Fill(20.0, 34.0)
    assert fill.id is None and fill.uniformity_coefficient == 4.0


def test_traffic_number_retained_preset_and_per_segment_defaults(presets) -> None:
    text = DESIGN_EXAMPLE.replace("spacing_m = 0.75\n", "") + _segment_text(
        'traffic = 12\nretained = "cohesive"\nreinforcement = "geogrid"\nstructure = "abutment"'
    )
    c = store.loads(text, "x", presets)
    first, seg = c.segments
    assert seg.traffic == 12.0 and isinstance(seg.traffic, float)
    coh = presets.fills["cohesive"]
    assert seg.retained == model.Soil(coh.unit_weight_kn_m3, coh.friction_deg, coh.cohesion_kpa)
    # no spacing anywhere: each segment takes its reinforcement preset's spacing
    assert first.spacing_m == 0.75 and seg.spacing_m == presets.reinforcement["geogrid"].spacing_m
    assert seg.structure == "abutment" and first.structure == "wall"
    again = store.loads(store.dumps(c, presets=presets), "x", presets)
    assert again == c
    assert "spacing_m" not in tomllib.loads(store.dumps(c, presets=presets))["segment"][1]


def test_rules_and_inline_factor_set(presets) -> None:
    text = (
        DESIGN_EXAMPLE.replace(
            'factor_set = "aashto-lrfd"',
            'factor_set = { preset = "aashto-lrfd", eccentricity_limit_soil = 0.3333 }',
        )
        + "\n[rules]\nmax_height_m = 14.0\n"
    )
    c = store.loads(text, "x", presets)
    assert c.factor_set.id == "aashto-lrfd" and c.factor_set.eccentricity_limit_soil == 0.3333
    assert c.factor_set.resistance == presets.factor_sets["aashto-lrfd"].resistance
    assert c.rules == dataclasses.replace(presets.rules, max_height_m=14.0)
    written = tomllib.loads(store.dumps(c, presets=presets))
    assert written["rules"] == {"max_height_m": 14.0}
    assert written["corridor"]["factor_set"] == {
        "preset": "aashto-lrfd",
        "eccentricity_limit_soil": 0.3333,
    }
    assert store.loads(store.dumps(c, presets=presets), "x", presets) == c


def test_custom_reinforcement_with_its_own_grades(presets) -> None:
    text = DESIGN_EXAMPLE + _segment_text(
        '\n[segment.reinforcement]\nmaterial = "geogrid"\nkind = "extensible"\n'
        "spacing_m = 0.5\nscale_effect_alpha = 0.8\nrf_creep = 1.7\n"
        '[[segment.reinforcement.grade]]\nname = "A"\nultimate_strength_kn_m = 40.0\n'
        '[[segment.reinforcement.grade]]\nname = "B"\nultimate_strength_kn_m = 70.0\n'
    )
    c = store.loads(text, "x", presets)
    r = c.segments[1].reinforcement
    assert r.id is None and [g.ultimate_strength_kn_m for g in r.grades] == [40.0, 70.0]
    assert store.loads(store.dumps(c, presets=presets), "x", presets) == c


# ------------------------------------------------------------------ with a screen


def test_results_written_and_ignored_on_load(presets) -> None:
    from screening.engine import screen

    corridor = store.load(demo_corridor_path(), presets)
    result = screen(corridor)
    text = store.dumps(corridor, result, presets)
    doc = tomllib.loads(text)
    assert text.index("[screen]") < text.index("[corridor]")
    assert doc["screen"]["factor_set"] == "aashto-lrfd"
    assert doc["screen"]["engine_version"] == result.engine_version
    assert sum(doc["screen"][v] for v in model.VERDICTS) == len(corridor.segments)
    for i, seg in enumerate(doc["segment"]):
        res = seg["result"]
        assert res["verdict"] == result.verdict[i]
        assert res["governing"] == result.governing[i]
        assert res["length_m"] == pytest.approx(float(result.length_m[i]), abs=0.005)
        assert 0 <= float(result.min_cdr[i]) - res["min_cdr"] < 1e-3  # cut, never rounded up
        assert set(res) >= {"verdict", "governing", "length_m", "length_ratio", "min_cdr"}
    stored = store.stored_screen(text)
    assert stored is not None and stored.screen["factor_set"] == "aashto-lrfd"
    assert [stored.results[s.id]["verdict"] for s in corridor.segments] == result.verdict
    assert store.stored_screen(store.dumps(corridor, presets=presets)) is None
    # results never feed back into inputs
    assert store.loads(text, "x", presets) == corridor
    tampered = text.replace('verdict = "refer"', 'verdict = "clear"')
    assert store.loads(tampered, "x", presets) == corridor


def test_result_of_another_corridor_is_refused(presets, example) -> None:
    from screening.engine import screen

    result = screen(store.load(demo_corridor_path(), presets))
    with pytest.raises(ValueError, match="screen it again"):
        store.dumps(example, result, presets)


def test_numpy_values_become_plain_toml_values() -> None:
    """tomli_w refuses numpy integers and booleans (TEXTUAL-NOTES §4): convert first."""
    out = to_builtin({"a": np.int64(3), "b": np.bool_(True), "c": np.arange(2.0), "d": None})
    assert out == {"a": 3, "b": True, "c": [0.0, 1.0]}
    assert type(out["a"]) is int and type(out["b"]) is bool


# ------------------------------------------------------------------ saving


def test_save_keeps_a_backup_and_no_temporary_files(tmp_path: Path, example, presets) -> None:
    path = tmp_path / "corridor.toml"
    store.save(path, example, presets=presets)
    first = path.read_text()
    assert store.load(path, presets) == example
    changed = dataclasses.replace(example, name="Renamed")
    store.save(path, changed, presets=presets)
    assert (tmp_path / "corridor.toml.bak").read_text() == first
    assert store.load(path, presets).name == "Renamed"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["corridor.toml", "corridor.toml.bak"]


def test_save_keeps_the_file_mode(tmp_path: Path, example, presets) -> None:
    path = tmp_path / "corridor.toml"
    path.write_text("old")
    os.chmod(path, 0o640)
    store.save(path, example, presets=presets)
    assert path.stat().st_mode & 0o777 == 0o640


def test_failed_serialisation_leaves_the_old_file_intact(tmp_path: Path, example, presets) -> None:
    path = tmp_path / "corridor.toml"
    store.save(path, example, presets=presets)
    before = path.read_bytes()
    broken = dataclasses.replace(example, note=object())  # not writable as TOML
    with pytest.raises(TypeError):
        store.save(path, broken, presets=presets)
    assert path.read_bytes() == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["corridor.toml"]


def test_save_into_a_missing_folder_is_an_input_error(tmp_path: Path, example, presets) -> None:
    with pytest.raises(InputError, match="does not exist; create it first"):
        store.save(tmp_path / "no" / "such" / "c.toml", example, presets=presets)


# ------------------------------------------------------------------ one field at a time


def test_segment_fields_are_segment_inputs() -> None:
    names = [f.name for f in SEGMENT_FIELDS]
    assert set(names) == {f.name for f in dataclasses.fields(model.Segment)}
    assert len(names) == len(set(names))
    assert all(f.description for f in SEGMENT_FIELDS)
    units = {f.name: f.unit for f in SEGMENT_FIELDS}
    assert units["height_start_m"] == "m" and units["surcharge_kpa"] == "kPa"


def test_coerce_field_reads_what_a_person_types(presets) -> None:
    assert coerce_field("height_end_m", " 6.5 ", presets) == 6.5
    assert coerce_field("height_end_m", 7, presets) == 7.0
    assert coerce_field("traffic", "parallel", presets) == "parallel"
    assert coerce_field("traffic", "15", presets) == 15.0
    assert coerce_field("water_in_fill", "yes", presets) is True
    assert coerce_field("fill", "crushed-rock", presets) is presets.fills["crushed-rock"]
    assert coerce_field("fill", '{ preset = "crushed-rock", friction_deg = 34 }', presets) == (
        dataclasses.replace(presets.fills["crushed-rock"], friction_deg=34.0)
    )
    assert coerce_field("foundation", "{ undrained_strength_kpa = 40 }", presets) == (
        model.Foundation(undrained_strength_kpa=40.0)
    )
    assert coerce_field("structure", "abutment", presets) == "abutment"


@pytest.mark.parametrize(
    ("field", "raw", "message"),
    [
        ("height_end_m", "abc", 'height_end_m: expected a number in m, got "abc"'),
        ("height_end_m", "-1", "height_end_m: must be between 0 and 30 m (got -1)"),
        ("backslope_deg", "50", "backslope_deg: must be between 0 and 45 degrees (got 50)"),
        ("traffic", "heavy", "traffic: must be none, parallel, approach or a number in kPa"),
        ("fill", "granular", 'did you mean "granular-wellgraded"?'),
        ("fill", "{ friction_deg = 60 }", "fill.friction_deg: must be between 15 and 50"),
        ("fill", "{ friction_deg = ", "fill: not a valid table of values"),
        ("water_in_fill", "maybe", 'water_in_fill: expected true or false, got "maybe"'),
        ("id", "  ", "id: must not be empty"),
        ("heigth_end_m", "1", 'did you mean "height_end_m"?'),
    ],
)
def test_coerce_field_refuses_with_a_reason(presets, field, raw, message) -> None:
    with pytest.raises(InputError) as info:
        coerce_field(field, raw, presets)
    assert message in str(info.value)


def test_check_segment_rules_between_fields(example) -> None:
    seg = example.segments[0]
    check_segment(seg)
    with pytest.raises(InputError, match="chainage_end_m: must be greater than"):
        check_segment(dataclasses.replace(seg, chainage_end_m=seg.chainage_start_m))
    with pytest.raises(InputError, match="spacing_m: 1.5 m is larger than"):
        check_segment(dataclasses.replace(seg, spacing_m=1.5, height_start_m=1.0, height_end_m=1.2))
