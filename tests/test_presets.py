"""The shipped presets: every file loads, and the numbers are the ones their sources give.

Sources are named beside each check; "from memory" marks values recalled from a standard
rather than read from it in this session (the preset files carry the same [mem] tags).
"""

from __future__ import annotations

import math
import shutil
from dataclasses import fields
from pathlib import Path

import pytest

from screening import model, store
from screening.model.errors import InputError
from screening.model.presets import FILES, demo_corridor_path, load_presets, presets_root
from screening.model.schema import RESISTANCE_KEYS

SHIPPED = Path(__file__).resolve().parent.parent / "presets"


@pytest.fixture(scope="module")
def presets():
    return load_presets()


def test_every_preset_file_is_there_and_loads(presets) -> None:
    root = Path(str(presets_root()))
    for name in (*FILES.values(), "demo-corridor.toml"):
        assert (root / name).is_file(), name
    assert len(presets.fills) >= 5
    assert {"granular-wellgraded", "sand-uniform", "crushed-rock", "cohesive"} <= set(presets.fills)
    assert {"steel-strip", "steel-grid", "geogrid", "geotextile"} <= set(presets.reinforcement)
    assert set(presets.factor_sets) == {"aashto-lrfd", "asd", "en1997-da1", "bs8006"}
    assert isinstance(presets.rules, model.Rules)


def test_cached(presets) -> None:
    assert load_presets() is presets


def test_ids_are_recorded(presets) -> None:
    for kind in (presets.fills, presets.reinforcement, presets.factor_sets):
        for pid, obj in kind.items():
            assert obj.id == pid
            assert obj.name, pid


def test_fill_categories_against_select_fill_limits(presets) -> None:
    """Select fill: fines <= 15 %, PI <= 6 (from memory, AASHTO LRFD Bridge Construction
    Specifications 7.3.6.3); the marginal and cohesive categories must fall outside them and
    the granular ones inside, or the category names would lie."""
    rules = presets.rules
    for pid in ("granular-wellgraded", "gravel-sandy", "crushed-rock", "sand-uniform"):
        f = presets.fills[pid]
        assert f.fines_percent <= rules.max_fines_percent and f.plasticity_index <= 6, pid
        assert f.friction_deg >= rules.min_fill_friction_deg, pid
    for pid in ("sand-silty-marginal", "cohesive"):
        f = presets.fills[pid]
        assert f.fines_percent > rules.max_fines_percent or f.plasticity_index > 6, pid
    # uniform sand is uniform, well graded is well graded (Cu >= 4 for sand, common
    # practice, no source beyond the USCS grading rule)
    assert presets.fills["sand-uniform"].uniformity_coefficient < 4
    assert presets.fills["granular-wellgraded"].uniformity_coefficient >= 4


def test_steel_strip_preset(presets) -> None:
    """Ribbed strip 50 x 4 mm, Fy 450 MPa, 86 um zinc (the brief; 86 um from memory,
    AASHTO LRFD 11.10.6.4.2a / ASTM A123); Rc = strips per metre x strip width."""
    r = presets.reinforcement["steel-strip"]
    assert (r.material, r.kind) == ("steel-strip", "inextensible")
    assert r.yield_strength_mpa == 450.0 and r.zinc_coating_um == 86.0
    assert r.spacing_m == 0.75  # METHOD §1: strips behind panels, common practice
    counts = [g.elements_per_m for g in r.grades]
    assert counts == sorted(counts), "grades lightest first"
    for g in r.grades:
        assert (g.width_mm, g.thickness_mm) == (50.0, 4.0)
        assert g.coverage_ratio == pytest.approx(g.elements_per_m * g.width_mm / 1000.0)


def test_grades_lightest_first_and_geogrids_full_width(presets) -> None:
    for pid, r in presets.reinforcement.items():
        if r.material in ("geogrid", "geotextile"):
            strengths = [g.ultimate_strength_kn_m for g in r.grades]
            assert strengths == sorted(strengths), pid
            assert all(g.coverage_ratio == 1.0 for g in r.grades), pid
            assert r.kind == "extensible"
        if r.material == "steel-grid":
            areas = [g.bars_per_m * g.bar_diameter_mm**2 for g in r.grades]
            assert areas == sorted(areas), pid
            assert r.transverse_bar_diameter_mm and r.transverse_bar_spacing_mm
    assert len(presets.reinforcement["geogrid"].grades) >= 3


def test_scale_effect_alpha(presets) -> None:
    """alpha: steel 1.0, geogrid 0.8, geotextile 0.6 (from memory, AASHTO LRFD Table
    11.10.6.3.2-1)."""
    expected = {"steel-strip": 1.0, "steel-grid": 1.0, "geogrid": 0.8, "geotextile": 0.6}
    for r in presets.reinforcement.values():
        assert r.scale_effect_alpha == expected[r.material], r.id


def test_lrfd_factor_set(presets) -> None:
    """AASHTO LRFD Strength I load factors, Table 3.4.1-2 (EV 1.35/1.00, EH active 1.50,
    ES 1.50/0.75) and Table 3.4.1-1 (LS 1.75); resistance factors Table 11.5.7-1 (sliding
    1.0, bearing 0.65, pullout 0.90, strips 0.75, grids 0.65, geosynthetics 0.90) and
    11.6.3.7 (compound 0.65) - all from memory; eccentricity L/4 on soil per GEC 11 (2009)."""
    fs = presets.factor_sets["aashto-lrfd"]
    assert fs.method == "lrfd"
    (case,) = fs.cases
    assert case.name == "Strength I"
    assert (case.ev, case.ev_resisting, case.eh, case.es, case.es_resisting, case.ls) == (
        1.35,
        1.00,
        1.50,
        1.50,
        0.75,
        1.75,
    )
    assert fs.resistance == {
        "sliding": 1.0,
        "bearing": 0.65,
        "pullout": 0.90,
        "rupture_steel_strip": 0.75,
        "rupture_steel_grid": 0.65,
        "rupture_geosynthetic": 0.90,
        "compound": 0.65,
        "compound_abutment": 0.65,
    }
    assert fs.eccentricity_limit_soil == 0.25
    assert "[mem]" in fs.source or "[pub" in fs.source


def test_asd_factor_set_is_one_over_fs(presets) -> None:
    """FHWA-NHI-00-043 (from memory): FS sliding 1.5, bearing 2.5, pullout 1.5, compound 1.3
    (1.5 under abutments); steel 0.55 Fy strips, 0.48 Fy mats; e <= L/6 soil, L/4 rock."""
    fs = presets.factor_sets["asd"]
    (case,) = fs.cases
    assert all(
        getattr(case, f.name) == 1.0 for f in fields(case) if f.name not in ("name", "checks")
    )
    r = fs.resistance
    assert r["sliding"] == pytest.approx(1 / 1.5) and r["pullout"] == pytest.approx(1 / 1.5)
    assert r["bearing"] == pytest.approx(1 / 2.5)
    assert r["compound"] == pytest.approx(1 / 1.3)
    assert r["compound_abutment"] == pytest.approx(1 / 1.5)
    assert (r["rupture_steel_strip"], r["rupture_steel_grid"]) == (0.55, 0.48)
    assert fs.eccentricity_limit_soil == pytest.approx(1 / 6)
    assert fs.eccentricity_limit_rock == pytest.approx(1 / 4)


def test_en1997_da1_combinations(presets) -> None:
    """EN 1997-1 Annex A recommended values (from memory): A1 gammaG 1.35 / 1.0, gammaQ 1.5;
    A2 gammaG 1.0, gammaQ 1.3; M2 gamma_tanphi 1.25, gamma_c 1.25, gamma_cu 1.4; R1 = 1.0."""
    fs = presets.factor_sets["en1997-da1"]
    c1, c2 = fs.cases
    assert (c1.name, c1.ev, c1.ev_resisting, c1.ls, c1.tan_phi) == ("DA1-C1", 1.35, 1.0, 1.5, 1.0)
    assert (c2.name, c2.ev, c2.ls, c2.tan_phi, c2.cohesion, c2.undrained) == (
        "DA1-C2",
        1.0,
        1.3,
        1.25,
        1.25,
        1.4,
    )
    assert fs.resistance["sliding"] == fs.resistance["bearing"] == 1.0


def test_bs8006_combinations(presets) -> None:
    """BS 8006-1 combinations A, B, C (from memory, to verify): A all loads 1.5; B fill
    weight 1.0, earth pressure 1.5, no live load; C unfactored, no live load."""
    fs = presets.factor_sets["bs8006"]
    a, b, c = fs.cases
    assert (a.ev, a.eh, a.ls) == (1.5, 1.5, 1.5)
    assert (b.ev_resisting, b.eh, b.ls) == (1.0, 1.5, 0.0)
    assert (c.ev, c.eh, c.ls) == (1.0, 1.0, 0.0)
    assert fs.resistance["bearing"] == pytest.approx(1 / 1.35)
    assert fs.resistance["pullout"] == pytest.approx(1 / (1.3 * 1.1))


def test_every_factor_set_complete(presets) -> None:
    for fs in presets.factor_sets.values():
        assert set(fs.resistance) == set(RESISTANCE_KEYS), fs.id
        assert all(0 < v <= 1.0 for v in fs.resistance.values()), fs.id
        assert 0 < fs.eccentricity_limit_soil <= fs.eccentricity_limit_rock < 0.5
        assert fs.source and any(t in fs.source for t in ("[pub", "[mem", "[cp"))


def test_rules_are_method_section_7(presets) -> None:
    """rules.toml holds METHOD §7's thresholds (common practice and the sources tagged
    there); the model's defaults hold the same values, so a missing file changes nothing."""
    assert presets.rules == model.Rules()
    assert math.isclose(
        math.degrees(math.atan(1 / 2)), presets.rules.max_backslope_deg, abs_tol=0.01
    )  # 2H:1V


# ------------------------------------------------------------------ bad preset files


def _copy(tmp_path: Path) -> Path:
    for p in SHIPPED.glob("*.toml"):
        shutil.copy(p, tmp_path)
    return tmp_path


def test_bad_preset_value_names_file_line_table_field(tmp_path: Path) -> None:
    root = _copy(tmp_path)
    path = root / "fills.toml"
    text = path.read_text().replace("friction_deg = 36.0", "friction_deg = 66.0")
    path.write_text(text)
    line = next(i for i, s in enumerate(text.splitlines(), 1) if "66.0" in s)
    with pytest.raises(InputError) as info:
        load_presets(root)
    assert str(info.value) == (
        f"{path}:{line}:16: [fill.crushed-rock] friction_deg: must be between 15 and 50 "
        "degrees (got 66)"
    )


def test_bad_preset_syntax_has_line_and_column(tmp_path: Path) -> None:
    root = _copy(tmp_path)
    path = root / "reinforcement.toml"
    path.write_text(path.read_text().replace('kind = "inextensible"', "kind = inextensible", 1))
    with pytest.raises(InputError, match=r"reinforcement\.toml:\d+:8: TOML syntax"):
        load_presets(root)


def test_bad_grade_in_preset(tmp_path: Path) -> None:
    root = _copy(tmp_path)
    path = root / "reinforcement.toml"
    path.write_text(path.read_text().replace('name = "PET 80 kN/m"', 'nmae = "PET 80 kN/m"'))
    with pytest.raises(InputError) as info:
        load_presets(root)
    assert 'grade[3].nmae: unknown key "nmae"; did you mean "name"?' in str(info.value)
    assert "[reinforcement.geogrid]" in str(info.value)


# ------------------------------------------------------------------ the demo corridor


def test_demo_corridor_loads(presets) -> None:
    corridor = store.load(demo_corridor_path(), presets)
    assert 20 <= len(corridor.segments) <= 40
    heights = [s.exposed_height_m for s in corridor.segments]
    assert min(heights) >= 1.0 and max(heights) <= 12.0
    assert len({s.wall for s in corridor.segments}) >= 3
    assert len({s.fill.id for s in corridor.segments}) >= 4
    assert len({s.traffic for s in corridor.segments}) >= 3
    assert len({s.foundation for s in corridor.segments}) >= 3


def test_demo_corridor_gives_all_three_verdicts_for_sound_reasons(presets) -> None:
    """The demo must show every verdict, each for a reason an engineer expects (METHOD §7):
    soft clay, marginal fill, a tall abutment and water at the face are outside screening;
    a wall over 10 m is at best marginal; low walls on good ground can follow a standard
    design."""
    from screening.engine import screen

    corridor = store.load(demo_corridor_path(), presets)
    result = screen(corridor)
    counts = result.counts()
    assert all(counts[v] > 0 for v in model.VERDICTS), counts

    def why(sid: str) -> tuple[str, str]:
        i = result.index(sid)
        return result.verdict[i], " ".join(result.reasons[i]).lower()

    verdict, reasons = why("EL-04")  # cu 20 kPa
    assert verdict == "refer" and "soft" in reasons
    for sid in ("ER-03", "R-06"):  # fines and PI above the select-fill limits
        verdict, reasons = why(sid)
        assert verdict == "refer" and "fill" in reasons, sid
    verdict, reasons = why("EA-01")  # design height above 12 m
    assert verdict == "refer" and "height" in reasons
    verdict, reasons = why("ER-01")  # flood water at the face
    assert verdict == "refer" and "water" in reasons
    verdict, reasons = why("EL-01")  # over 10 m on gravel
    assert verdict != "clear" and "height" in reasons
    clear = [result.ids[i] for i, v in enumerate(result.verdict) if v == "clear"]
    for sid in clear:
        seg = corridor.segments[result.index(sid)]
        assert seg.exposed_height_m <= 10.0 and seg.fill.fines_percent <= 15.0, sid
