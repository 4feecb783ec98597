"""LandXML profile reading, on a small file written for these tests (tests/data/profiles).

approach.xml: design profile PVI 0 / 100.0, a symmetric parabolic curve of length 40 m at
PVI 100 / 104.0, PVI 200 / 102.0; ground level at 99.0 throughout. By hand:
g1 = +0.04, g2 = -0.02, A = g2 - g1 = -0.06; BVC at 80 (level 103.2), EVC at 120
(level 103.6); the curve's offset from the tangents at the PVI is A·L/8 = -0.30 m, so the
road is at 103.7 there (the standard parabolic vertical curve, e.g. AASHTO "A Policy on
Geometric Design of Highways and Streets", ch. 3 — from memory). Heights above the
ground: 1.0 at 0, 4.2 at 80, 4.7 at 100, 4.6 at 120, 3.0 at 200.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pytest

from screening.engine.samples import ASD, GEOGRID, make_defaults
from screening.model.errors import InputError
from screening.profile.build import corridor_from_profile
from screening.profile.landxml import read_profile_xml

DATA = Path(__file__).parent / "data" / "profiles"
APPROACH = (DATA / "approach.xml").read_text()


def _height(line, x):
    return float(np.interp(x, line.chainage_m, line.height_m))


def test_crest_curve_heights_match_the_hand_calculation():
    (line,) = read_profile_xml(DATA / "approach.xml")
    assert line.wall == "East approach"
    for x, h in [(0, 1.0), (50, 3.0), (80, 4.2), (100, 4.7), (120, 4.6), (160, 3.8), (200, 3.0)]:
        assert _height(line, x) == pytest.approx(h, abs=1e-9), x
    # inside the curve at 90 m: tangent 103.6 + A/(2L)·(90-80)^2 = 103.6 - 0.075 -> height 4.525
    assert _height(line, 90.0) == pytest.approx(4.525, abs=1e-9)


def test_unsymmetric_curve_offset():
    """lengthIn 20, lengthOut 60: e = A·l1·l2 / (2(l1 + l2)) = -0.06·20·60/160 = -0.45 m
    at the PVI (unsymmetrical vertical curve, standard route-surveying texts, from memory)."""
    text = APPROACH.replace(
        '<ParaCurve length="40">100 104.0</ParaCurve>',
        '<UnsymParaCurve lengthIn="20" lengthOut="60">100 104.0</UnsymParaCurve>',
    )
    (line,) = read_profile_xml("u.xml", text=text)
    assert _height(line, 100.0) == pytest.approx(5.0 - 0.45, abs=1e-9)
    assert _height(line, 80.0) == pytest.approx(4.2, abs=1e-9)  # before BVC: tangent
    assert _height(line, 160.0) == pytest.approx(3.8, abs=1e-9)  # at EVC: tangent


def test_feet_are_converted_to_metres():
    """International foot = 0.3048 m exactly (NIST SP 811)."""
    text = APPROACH.replace('<Metric linearUnit="meter"', '<Imperial linearUnit="foot"')
    (line,) = read_profile_xml("ft.xml", text=text)
    assert line.chainage_m[-1] == pytest.approx(200 * 0.3048)
    assert _height(line, 100 * 0.3048) == pytest.approx(4.7 * 0.3048, abs=1e-9)


def test_named_profiles_swap_top_and_toe_for_a_wall_in_cut():
    """Top = ground, toe = road: the road is above the ground everywhere, so no wall at all."""
    (line,) = read_profile_xml(
        DATA / "approach.xml", top_profile="existing ground", toe_profile="finished road"
    )
    assert max(line.height_m) == 0.0


def test_corridor_from_landxml_segments_by_step():
    defaults = make_defaults(reinforcement=GEOGRID)
    c = corridor_from_profile(
        DATA / "approach.xml",
        name="Approach",
        defaults=defaults,
        factor_set=ASD,
        max_step_m=1.0,
        max_length_m=100.0,
        round_m=0.0,  # the cuts as computed
    )
    ids = [s.id for s in c.segments]
    assert ids[0] == "EA-01"
    # 1.0 m at 0 rising 0.04 m/m: first cut when 2.0 m is reached at 25 m, then 50 m, 75 m
    assert [s.chainage_end_m for s in c.segments[:3]] == [25.0, 50.0, 75.0]
    # the crest of the curve is where its slope g1 + A·t/L is zero: t = 0.04·40/0.06 =
    # 26.667 m past the BVC, at 106.667 m, road 103.7333, height 4.733: an interior high
    # point, so a segment ends there; then the height falls to 4.733 - 1.0 on the out
    # tangent (4.6 - 0.02·(x - 120)) at x = 163.333 m
    assert [s.chainage_end_m for s in c.segments[3:]] == [106.667, 163.333, 200.0]
    assert c.segments[3].height_end_m == pytest.approx(4.733, abs=1e-3)
    # contiguous and covering the whole alignment
    assert c.segments[0].chainage_start_m == 0.0 and c.segments[-1].chainage_end_m == 200.0
    for a, b in zip(c.segments, c.segments[1:], strict=False):
        assert a.chainage_end_m == b.chainage_start_m and a.height_end_m == b.height_start_m


@pytest.mark.parametrize(
    ("text", "expected"),
    [
        ((DATA / "bad_xml.xml").read_text(), "b.xml:7: <PntList2D>: 'x' is not a number"),
        ("<LandXML><Alignments>", "b.xml:1:22: not well-formed XML: no element found"),
        ("<Other/>", "b.xml:1: the root element is <Other>, not <LandXML>"),
        ("<LandXML/>", "b.xml: no <Alignment> with a <Profile> in this LandXML file"),
        (
            APPROACH.replace('linearUnit="meter"', 'linearUnit="cubit"'),
            "b.xml:5: linearUnit 'cubit' is not known",
        ),
        (
            APPROACH.replace(
                '<ProfSurf name="existing ground">',
                '<ProfAlign name="x"><PVI>0 1</PVI><PVI>9 1</PVI></ProfAlign><ProfSurfX>',
            ).replace("</ProfSurf>", "</ProfSurfX>"),
            "alignment 'East approach' has no <ProfSurf> for the toe",
        ),
        (
            APPROACH.replace("<PVI>200 102.0</PVI>", "<PVI>90 102.0</PVI>"),
            "<PVI> station 90 is not after the one before",
        ),
        (
            APPROACH.replace('length="40"', 'length="-4"'),
            "<ParaCurve> length='-4': give a length >= 0",
        ),
        (
            APPROACH.replace("</Profile>", '</Profile><StaEquation staBack="10" staAhead="20"/>'),
            "has station equations",
        ),
    ],
)
def test_bad_landxml(text, expected):
    with pytest.raises(InputError) as err:
        read_profile_xml("b.xml", text=text)
    assert expected in str(err.value)


def test_unknown_profile_name_lists_the_names_there():
    with pytest.raises(InputError, match="has no profile named 'road' for the top of the wall"):
        read_profile_xml(DATA / "approach.xml", top_profile="road")


def test_alignment_without_a_ground_profile_is_passed_over_and_noted(tmp_path):
    """A centreline exported with only its design profile gives no wall; the other does."""
    text = APPROACH.replace(
        '<Alignment name="No profile here" staStart="0" length="50"/>',
        '<Alignment name="Centreline"><Profile><ProfAlign name="road"><PVI>0 10</PVI>'
        "<PVI>50 11</PVI></ProfAlign></Profile></Alignment>",
    )
    skipped: list[str] = []
    lines = read_profile_xml("two.xml", text=text, skipped=skipped)
    assert [line.wall for line in lines] == ["East approach"]
    assert skipped == [
        "skipped alignment 'Centreline' has no <ProfSurf> for the toe; name the profiles to use"
    ]
    path = tmp_path / "two.xml"
    path.write_text(text)
    c = corridor_from_profile(path, name="Two", max_step_m=1.0, max_length_m=100.0)
    assert "skipped alignment 'Centreline'" in c.note


def test_step_in_the_ground_profile_and_a_circular_curve():
    """A repeated station in PntList2D is a step (the ground drops 1 m at 60); a CircCurve
    of length 40 m is read as the parabola of that length (same levels as ParaCurve)."""
    text = APPROACH.replace(
        "<PntList2D>0 99.0 200 99.0</PntList2D>",
        "<PntList2D>0 99.0 60 99.0 60 98.0 200 98.0</PntList2D>",
    )
    (line,) = read_profile_xml("s.xml", text=text)
    at60 = [h for c, h in zip(line.chainage_m, line.height_m, strict=True) if c == 60.0]
    assert at60 == pytest.approx([3.4, 4.4])  # road 102.4 over ground 99 then 98
    circ = APPROACH.replace(
        '<ParaCurve length="40">', '<CircCurve length="40" radius="666.67">'
    ).replace("</ParaCurve>", "</CircCurve>")
    (a,) = read_profile_xml("c.xml", text=circ)
    (b,) = read_profile_xml("p.xml", text=APPROACH)
    assert a.height_m == b.height_m


def test_a_folder_is_not_a_profile(tmp_path):
    folder = tmp_path / "profile.xml"
    folder.mkdir()
    with pytest.raises(InputError, match="is a folder, not a profile file"):
        read_profile_xml(folder)


def test_two_alignments_of_one_name_become_two_walls_with_their_own_ids(tmp_path):
    """Segment ids must be unique and one wall's segments must not overlap (store rules)."""
    from screening import store

    second = APPROACH[
        APPROACH.index("<Alignment name=") : APPROACH.index("</Alignment>") + len("</Alignment>")
    ]
    text = APPROACH.replace("</Alignments>", second + "</Alignments>")
    path = tmp_path / "twice.xml"
    path.write_text(text)
    c = corridor_from_profile(path, name="Twice", max_step_m=1.0, max_length_m=100.0)
    walls = sorted({s.wall for s in c.segments})
    assert walls == ["East approach", "East approach (2)"]
    ids = [s.id for s in c.segments]
    assert len(ids) == len(set(ids))
    assert store.loads(store.dumps(c), "twice.toml") == c
