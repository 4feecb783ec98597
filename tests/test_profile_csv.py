"""Profile import from CSV: hand-made profiles with segment counts and heights worked by hand.

Every expected value below is worked out by hand from the invented profile in
tests/data/profiles/ (linear interpolation between the profile points): no engine result
is involved, so the numbers are independent checks, not copies of program output.
"""

from __future__ import annotations

from pathlib import Path

import pytest

from screening import store
from screening.corridor.edit import edit_segments, select_segments
from screening.engine.samples import LRFD, make_defaults
from screening.model import (
    Defaults,
)
from screening.model.errors import InputError
from screening.profile.build import corridor_from_profile, join_low_pieces
from screening.profile.csv_file import read_profile_csv

DATA = Path(__file__).parent / "data" / "profiles"


def _defaults(spacing_m: float | None = None) -> Defaults:
    return make_defaults(spacing_m=spacing_m, traffic="approach")


FACTORS = LRFD


def _corridor(name: str, **kw):
    """The raw split (no rounding, no least length), unless a test asks for them."""
    kw = {"round_m": 0.0, "min_length_m": 0.0, **kw}
    return corridor_from_profile(
        DATA / name, name="Test", defaults=_defaults(), factor_set=FACTORS, **kw
    )


def _geometry(corridor):
    return [
        (s.chainage_start_m, s.chainage_end_m, s.height_start_m, s.height_end_m)
        for s in corridor.segments
    ]


def test_linear_ramp_splits_at_each_half_metre_of_height():
    """1.0 -> 3.0 m over 100 m rises 0.02 m/m: a 0.5 m step is reached every 25 m (4 segments)."""
    c = _corridor("ramp.csv", max_step_m=0.5)
    assert _geometry(c) == [
        (0.0, 25.0, 1.0, 1.5),
        (25.0, 50.0, 1.5, 2.0),
        (50.0, 75.0, 2.0, 2.5),
        (75.0, 100.0, 2.5, 3.0),
    ]
    assert [s.id for s in c.segments] == ["TEST-01", "TEST-02", "TEST-03", "TEST-04"]
    assert all(s.wall == "Test" for s in c.segments)


def test_ramp_with_larger_step_is_cut_by_the_length_limit_into_equal_parts():
    """Step 5 m never governs; 100 m with max 30 m needs ceil(100/30) = 4 equal parts of 25 m."""
    c = _corridor("ramp.csv", max_step_m=5.0, max_length_m=30.0)
    assert [s.length_along_m for s in c.segments] == [25.0] * 4
    assert [s.height_end_m for s in c.segments] == [1.5, 2.0, 2.5, 3.0]


def test_break_chainages_from_the_caller_cut_segments():
    c = _corridor("ramp.csv", max_step_m=5.0, max_length_m=200.0, breaks=(40.0, 70.0))
    assert _geometry(c) == [(0.0, 40.0, 1.0, 1.8), (40.0, 70.0, 1.8, 2.4), (70.0, 100.0, 2.4, 3.0)]


def test_defaults_reach_every_segment_and_spacing_falls_back_to_the_preset():
    c = _corridor("ramp.csv")
    seg = c.segments[0]
    assert seg.traffic == "approach"
    assert seg.fill.friction_deg == 34.0
    assert seg.spacing_m == 0.75  # Defaults.spacing_m None -> reinforcement.spacing_m


def test_two_walls_with_sides_from_levels():
    """Height = top level - toe level; a step in the top (two rows at 520) starts a segment."""
    c = _corridor("two_walls_levels.csv", max_step_m=0.5, max_length_m=30.0)
    by_wall: dict[str, list] = {}
    for s in c.segments:
        by_wall.setdefault(s.wall, []).append(s)
    assert set(by_wall) == {"North ramp, left", "North ramp, right", "W2"}
    # left: 2.0 m over 40 m, length limit 30 -> 2 x 20 m
    assert [(s.id, s.length_along_m, s.height_start_m) for s in by_wall["North ramp, left"]] == [
        ("NRL-01", 20.0, 2.0),
        ("NRL-02", 20.0, 2.0),
    ]
    # right: 2.5 m to 520, step to 3.5 m, 3.5 m to 540
    assert [
        (s.chainage_start_m, s.chainage_end_m, s.height_start_m, s.height_end_m)
        for s in by_wall["North ramp, right"]
    ] == [(500.0, 520.0, 2.5, 2.5), (520.0, 540.0, 3.5, 3.5)]
    # W2: no wall (height 0) from 10 to 20, then 0 -> 1.5 m over 20..30 (three 0.5 m steps
    # of 3.333 m), then 1.5 m to 40; the first piece (0 -> 0.5 m) is lower than one layer
    # spacing (0.75 m) and joins the piece after it
    w2 = by_wall["W2"]
    assert [s.id for s in w2] == ["W2-01", "W2-02", "W2-03"]
    assert [s.chainage_start_m for s in w2] == [20.0, 26.667, 30.0]
    assert [s.height_end_m for s in w2] == [1.0, 1.5, 1.5]


def test_semicolons_decimal_commas_kilometre_chainage_and_break_column():
    c = _corridor("semicolon_stations.csv", max_length_m=100.0)
    assert _geometry(c) == [(0.0, 20.0, 2.0, 2.0), (20.0, 60.0, 2.0, 2.0)]


@pytest.mark.parametrize(
    ("name", "expected"),
    [
        (
            "bad_number.csv",
            "bad_number.csv:4:2: height_m: 'abc' is not a number; write metres, e.g. 4.25",
        ),
        (
            "bad_fields.csv",
            "bad_fields.csv:3:3: this row has 3 fields but the header has 2 "
            "(a decimal comma? separate fields with ';' to use one)",
        ),
        (
            "bad_order.csv",
            "bad_order.csv:4:1: chainage_m: chainage 10 comes after 20 on line 3 of the wall; "
            "sort each wall's rows by chainage",
        ),
        (
            "bad_levels.csv",
            "bad_levels.csv:3:3: toe_level_m: toe level 10.5 m is above the top level 10.0 m; "
            "the top of the wall must be at or above the toe",
        ),
        (
            "bad_header.csv",
            "bad_header.csv:1: no 'chainage_m' column (is 'chainge' meant to be it?); "
            "the header has: chainge, height_m",
        ),
        (
            "bad_side.csv",
            "bad_side.csv:3:3: side: 'middle' is not a side; write left or right (or L / R)",
        ),
    ],
)
def test_bad_rows_name_line_column_and_what_is_valid(name, expected):
    with pytest.raises(InputError) as err:
        read_profile_csv(DATA / name)
    assert str(err.value).endswith(expected)


@pytest.mark.parametrize(
    ("text", "fragment"),
    [
        ("", "the profile is empty"),
        ("chainage_m,height_m\n", "has a header but no rows"),
        ("chainage_m,height_m\n0,1\n", "has a single row"),
        ("chainage_m,height_m\n0,-1\n5,1\n", "exposed height -1 m is negative"),
        ("chainage_m,height_m,top_level_m,toe_level_m\n0,1,2,1\n", "not both"),
        ("chainage_m,top_level_m\n0,1\n", "no 'toe_level_m' column"),
        ("chainage_m,height_m\n12+50,1\n", "must be kilometres\\+metres, e.g. 1\\+250.000"),
        ("chainage_m,height_m\n0,1\n0,2\n0,3\n", "appears three times"),
        ("chainage_m,height_m\n0,nan\n5,1\n", "is not a number"),
    ],
)
def test_more_bad_inputs(text, fragment):
    with pytest.raises(InputError, match=fragment):
        read_profile_csv("p.csv", text=text)


def test_bad_settings_and_unknown_suffix():
    with pytest.raises(InputError, match="max_step_m = 0"):
        _corridor("ramp.csv", max_step_m=0.0)
    with pytest.raises(InputError, match="use .csv or .xml"):
        corridor_from_profile(DATA / "ramp.dat", name="x", defaults=_defaults(), factor_set=FACTORS)
    with pytest.raises(InputError, match="profile file not found"):
        _corridor("missing.csv")


def test_all_zero_profile_gives_a_clear_error(tmp_path):
    p = tmp_path / "flat.csv"
    p.write_text("chainage_m,height_m\n0,0\n10,0\n")
    with pytest.raises(InputError, match="no stretch of wall higher than 0 m"):
        corridor_from_profile(p, name="x", defaults=_defaults(), factor_set=FACTORS)


def test_bulk_edit_sets_a_field_on_a_chainage_range_only():
    c = _corridor("ramp.csv")
    picked = select_segments(c, chainage_from_m=30.0, chainage_to_m=60.0)
    assert [c.segments[i].id for i in picked] == ["TEST-02", "TEST-03"]  # overlap 25-50 and 50-75
    edited = edit_segments(c, picked, traffic="parallel", surcharge_kpa=10.0)
    assert [s.traffic for s in edited.segments] == ["approach", "parallel", "parallel", "approach"]
    assert [s.surcharge_kpa for s in edited.segments] == [0.0, 10.0, 10.0, 0.0]
    assert c.segments[1].traffic == "approach"  # the original is untouched (frozen inputs)


def test_bulk_edit_refuses_unknown_fields_and_ids():
    c = _corridor("ramp.csv")
    with pytest.raises(InputError, match="did you mean 'surcharge_kpa'"):
        edit_segments(c, [0], surcharge_kp=5.0)
    with pytest.raises(InputError, match="cannot set 'height_start_m'"):
        edit_segments(c, [0], height_start_m=5.0)
    with pytest.raises(InputError, match="did you mean 'TEST-01'"):
        select_segments(c, ids=["T-1"])


def test_low_pieces_join_a_neighbour_or_are_left_out():
    pieces = [(0.0, 5.0, 0.0, 0.4), (5.0, 10.0, 0.4, 1.2), (20.0, 30.0, 0.3, 0.3)]
    kept, dropped = join_low_pieces(pieces, 0.75)
    assert kept == [(0.0, 10.0, 0.0, 1.2)]
    assert dropped == [(20.0, 30.0, 0.3, 0.3)]


def test_a_profile_corridor_saves_and_loads_back_unchanged(tmp_path):
    """The corridor file written from a profile is a valid file (store round trip)."""
    c = corridor_from_profile(DATA / "two_walls_levels.csv", name="Round trip", factor_set_id="asd")
    path = tmp_path / "new.toml"
    store.save(path, c)
    assert store.load(path) == c
    assert c.factor_set.id == "asd"
    assert c.defaults.fill.id == "granular-wellgraded"


def test_unknown_factor_set_id_is_an_input_error():
    with pytest.raises(InputError, match="unknown factor set 'asdd' \\(did you mean 'asd'\\?\\)"):
        corridor_from_profile(DATA / "ramp.csv", name="x", factor_set_id="asdd")


def test_profile_in_feet_with_hundred_foot_stations(tmp_path):
    """12+50.00 is 1250 ft; 1 ft = 0.3048 m exactly (NIST SP 811). A 'station' header is a
    chainage column."""
    p = tmp_path / "feet.csv"
    p.write_text("station,height\n10+00.00,10.0\n12+50.00,10.0\n")
    c = corridor_from_profile(p, name="Feet", profile_unit="ft", max_length_m=100.0)
    (seg,) = c.segments
    assert seg.chainage_start_m == pytest.approx(1000 * 0.3048, abs=1e-3)
    assert seg.chainage_end_m == pytest.approx(1250 * 0.3048, abs=1e-3)
    assert seg.height_start_m == pytest.approx(3.048, abs=1e-3)
    with pytest.raises(InputError, match="hundreds of feet, e.g. 12\\+50.00"):
        read_profile_csv("f.csv", text="station,height\n1+250.000,3\n2+000.000,3\n", unit="ft")
    with pytest.raises(InputError, match="profile unit 'yd': use m or ft"):
        read_profile_csv("f.csv", text="station,height\n0,3\n10,3\n", unit="yd")
