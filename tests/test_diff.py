"""Comparing two corridor files reports exactly the changes made, and how outcomes moved.

The two files are written here (invented test data): the new one differs from the old by
a known list of edits; the diff must list those and nothing else.
"""

from __future__ import annotations

import json

import pytest

from screening import store
from screening.corridor.diff import diff_corridors, diff_json, diff_text
from screening.engine import screen

OLD = """
schema = "wallscreen/1"

[corridor]
name = "Diff test"
factor_set = "aashto-lrfd"

[defaults]
fill = "granular-wellgraded"
reinforcement = "steel-strip"
traffic = "parallel"

[[segment]]
id = "A-01"
wall = "A"
chainage_start_m = 0.0
chainage_end_m = 20.0
height_start_m = 3.0
height_end_m = 4.0

[[segment]]
id = "A-02"
wall = "A"
chainage_start_m = 20.0
chainage_end_m = 40.0
height_start_m = 4.0
height_end_m = 5.0

[[segment]]
id = "A-03"
wall = "A"
chainage_start_m = 40.0
chainage_end_m = 60.0
height_start_m = 5.0
height_end_m = 6.0

[[segment]]
id = "A-04"
wall = "A"
chainage_start_m = 60.0
chainage_end_m = 80.0
height_start_m = 6.0
height_end_m = 6.0
"""


def _edit(text: str) -> str:
    """The edits the diff must find: A-02 taller with a lighter retained fill, A-03 gets
    a surcharge, A-04 removed, A-05 added; A-01 untouched."""
    new = text.replace(
        "chainage_start_m = 20.0\nchainage_end_m = 40.0\nheight_start_m = 4.0\nheight_end_m = 5.0",
        "chainage_start_m = 20.0\nchainage_end_m = 40.0\nheight_start_m = 4.0\nheight_end_m = 9.0\n"
        "retained = { unit_weight_kn_m3 = 19.0, friction_deg = 26.0, cohesion_kpa = 0.0 }",
    )
    new = new.replace(
        "height_start_m = 5.0\nheight_end_m = 6.0",
        "height_start_m = 5.0\nheight_end_m = 6.0\nsurcharge_kpa = 12.0",
    )
    head, _, _ = new.partition('[[segment]]\nid = "A-04"')
    return head + (
        '[[segment]]\nid = "A-05"\nwall = "A"\nchainage_start_m = 60.0\nchainage_end_m = 70.0\n'
        "height_start_m = 6.0\nheight_end_m = 2.0\n"
    )


@pytest.fixture(scope="module")
def versions(tmp_path_factory):
    folder = tmp_path_factory.mktemp("diff")
    (folder / "old.toml").write_text(OLD)
    (folder / "new.toml").write_text(_edit(OLD))
    old, new = store.load(folder / "old.toml"), store.load(folder / "new.toml")
    return old, new, screen(old), screen(new)


def test_diff_lists_exactly_the_edits(versions):
    old, new, r_old, r_new = versions
    diff = diff_corridors(old, new, r_old, r_new)
    by_id = {d.id: d for d in diff}
    assert set(by_id) == {"A-02", "A-03", "A-04", "A-05"}  # no change, not listed
    assert by_id["A-04"].status == "removed" and by_id["A-05"].status == "added"
    assert {(c.path, c.old, c.new) for c in by_id["A-02"].inputs} == {
        ("height_end_m", 5.0, 9.0),
        ("retained.friction_deg", 30.0, 26.0),
    }
    assert [(c.path, c.old, c.new) for c in by_id["A-03"].inputs] == [("surcharge_kpa", 0.0, 12.0)]
    assert diff.corridor == ()
    assert diff.compared == 3


def test_outcome_moves_in_the_direction_the_method_says(versions):
    """A taller wall with a weaker retained fill needs a longer L (Rankine Ka rises as φ
    falls, thrust grows with H²: common practice, no source); the engine's own numbers
    are read back, not recorded."""
    old, new, r_old, r_new = versions
    d = {d.id: d for d in diff_corridors(old, new, r_old, r_new)}["A-02"]
    assert d.new.length_m > d.old.length_m
    assert d.old.length_m == pytest.approx(float(r_old.length_m[r_old.index("A-02")]))
    assert d.new.verdict == r_new.verdict[r_new.index("A-02")]


def test_same_file_has_no_differences(versions):
    old, _, r_old, _ = versions
    diff = diff_corridors(old, old, r_old, r_old)
    assert list(diff) == [] and diff.corridor == ()
    assert diff_text(diff) == "0 of 4 segments changed, 0 added, 0 removed; 0 verdict(s) moved."
    every = diff_corridors(old, old, r_old, r_old, include_same=True)
    assert [d.status for d in every] == ["same"] * 4


def test_factor_set_change_moves_outcomes_without_segment_inputs(versions):
    old, _, r_old, _ = versions
    text = OLD.replace('factor_set = "aashto-lrfd"', 'factor_set = "asd"')
    other = store.loads(text, "asd.toml")
    diff = diff_corridors(old, other, r_old, screen(other))
    assert [(c.path, c.old, c.new) for c in diff.corridor] == [("factor_set", "aashto-lrfd", "asd")]
    assert all(d.inputs == () for d in diff)  # no segment input changed
    assert len(diff) >= 1  # at least one outcome moved under another code


def test_text_and_json_renderings(versions):
    old, new, r_old, r_new = versions
    diff = diff_corridors(old, new, r_old, r_new)
    text = diff_text(diff)
    assert "A-02  height_end_m 5 -> 9; retained.friction_deg 30 -> 26" in text
    assert "A-03  surcharge_kpa 0 -> 12" in text
    assert "A-04  removed (was" in text and "A-05  added (" in text
    assert text.endswith(
        "2 of 3 segments changed, 1 added, 1 removed; " + text.rsplit("removed; ", 1)[1]
    )
    payload = diff_json(diff)
    json.dumps(payload)  # plain built-ins only
    assert [s["id"] for s in payload["segments"]] == ["A-02", "A-03", "A-05", "A-04"]


def test_diff_without_results_compares_inputs_only(versions):
    old, new, _, _ = versions
    diff = diff_corridors(old, new)
    assert {d.id for d in diff} == {"A-02", "A-03", "A-04", "A-05"}
    assert all(d.old is None and d.new is None for d in diff)


def test_rules_and_design_life_changes_are_corridor_level(versions):
    old, _, _, _ = versions
    text = OLD.replace(
        'factor_set = "aashto-lrfd"', 'factor_set = "aashto-lrfd"\ndesign_life_years = 100'
    )
    text += "\n[rules]\nmarginal_cdr = 1.2\n"
    other = store.loads(text, "rules.toml")
    diff = diff_corridors(old, other)
    assert {(c.path, c.old, c.new) for c in diff.corridor} == {
        ("rules.marginal_cdr", 1.1, 1.2),
        ("design_life_years", None, 100.0),
    }
    assert list(diff) == []  # no segment input changed, and no screens to compare
    assert "corridor  rules.marginal_cdr: 1.1 -> 1.2" in diff_text(diff)
