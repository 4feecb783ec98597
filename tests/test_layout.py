"""Overlaps and gaps within a wall (``screening.corridor.layout``) and what ``check`` says.

The rule is the corridor file's own contract (DESIGN.md: segments of one wall must not
overlap in chainage), not an engineering fact. The fast search is checked against a plain
all-pairs search over generated layouts, so a wrong sort or running maximum cannot hide.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from screening import store
from screening.cli import main
from screening.corridor.layout import LayoutProblem, find_layout_problems
from screening.engine.samples import make_corridor, make_segment


def _corridor(rows: list[tuple[str, float, float]]):
    segs = [
        make_segment(i, wall=w, chainage_start_m=a, chainage_end_m=b)
        for i, (w, a, b) in enumerate(rows)
    ]
    return make_corridor(segs)


def test_overlap_gap_and_a_long_segment_covering_short_ones() -> None:
    c = _corridor(
        [
            ("W", 0.0, 100.0),
            ("W", 10.0, 20.0),  # inside the first
            ("W", 30.0, 40.0),  # inside the first, not touching the second
            ("W", 100.5, 110.0),  # 0.5 m gap after the first
            ("V", 0.0, 10.0),  # another wall at the same chainage: fine
            ("W", 110.0, 120.0),  # touching: fine
        ]
    )
    problems = find_layout_problems(c)
    assert problems == [
        LayoutProblem("overlap", "W", "S-00000", "S-00001", 10.0, 20.0),
        LayoutProblem("overlap", "W", "S-00000", "S-00002", 30.0, 40.0),
        LayoutProblem("gap", "W", "S-00000", "S-00003", 100.0, 100.5),
    ]
    words = problems[0].describe()
    assert "S-00000" in words and "S-00001" in words and "10 m" in words and "20 m" in words
    assert problems[2].describe().count("100") == 2 and "0.5 m" in problems[2].describe()


def test_gaps_below_the_threshold_are_not_problems() -> None:
    c = _corridor([("W", 0.0, 10.0), ("W", 10.005, 20.0)])
    assert find_layout_problems(c) == []
    assert [p.kind for p in find_layout_problems(c, min_gap_m=0.001)] == ["gap"]


def _all_pairs(rows: list[tuple[str, float, float]]) -> set[tuple[str, int]]:
    """Every segment that starts inside an earlier-starting segment of its wall."""
    out = set()
    for j, (w, a, _) in enumerate(rows):
        for i, (v, a0, b0) in enumerate(rows):
            if i != j and v == w and (a0, rows[i][2], i) < (a, rows[j][2], j) and a < b0 - 1e-9:
                out.add((w, j))
    return out


layouts = st.lists(
    st.tuples(
        st.sampled_from(["A", "B", "C"]),
        st.integers(0, 40).map(float),
        st.integers(1, 15).map(float),
    ).map(lambda t: (t[0], t[1], t[1] + t[2])),
    max_size=14,
)


@settings(max_examples=150, deadline=None, derandomize=True)
@given(layouts)
def test_every_overlap_is_found_as_an_all_pairs_search_finds_it(rows) -> None:
    found = {
        (p.wall, int(p.second_id[2:]))
        for p in find_layout_problems(_corridor(rows))
        if p.kind == "overlap"
    }
    assert found == _all_pairs(rows)


CORRIDOR = """schema = "wallscreen/1"
[corridor]
name = "Layout"
{segments}"""


def _file(tmp_path: Path, rows: list[tuple[str, float, float]]) -> Path:
    body = "".join(
        f'[[segment]]\nid = "{w}-{i}"\nwall = "{w}"\nchainage_start_m = {a}\n'
        f"chainage_end_m = {b}\nheight_start_m = 3.0\nheight_end_m = 3.0\n"
        for i, (w, a, b) in enumerate(rows)
    )
    path = tmp_path / "layout.toml"
    path.write_text(CORRIDOR.format(segments=body), encoding="utf-8")
    return path


def test_a_file_with_overlaps_loads_and_check_refuses_it(tmp_path, capsys) -> None:
    rows = [("N", 10.0 * k, 10.0 * k + 15.0) for k in range(8)]
    path = _file(tmp_path, rows)
    assert len(store.load(path).segments) == 8  # the interface opens it
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err.splitlines()
    assert len(err) == 6  # five problems, then the count
    assert err[0] == (
        f"wallscreen: {path}: segment N-1, chainage_start_m: overlaps segment N-0 of the same "
        'wall "N" from 10 m to 15 m; segments of one wall must not overlap (move or shorten '
        "one of them, or give one another wall)"
    )
    assert err[-1] == "wallscreen: ... and 2 more (7 in all)"


def test_a_gap_is_a_warning_and_check_runs(tmp_path, capsys) -> None:
    path = _file(tmp_path, [("N", 0.0, 10.0), ("N", 12.0, 20.0)])
    assert main(["check", str(path)]) == 0
    err = capsys.readouterr().err
    assert "warning" in err and "N-0 and N-1" in err and "from chainage 10 m to 12 m" in err


def test_one_overlap_among_one_hundred_thousand_segments() -> None:
    """The one displaced segment of 100,000 is found and named, and no other."""
    base = make_corridor([make_segment(i) for i in range(1000)])
    segs = [
        replace(
            s,
            id=f"{s.id}.{k}",
            chainage_start_m=s.chainage_start_m + 1e4 * k,
            chainage_end_m=s.chainage_end_m + 1e4 * k,
        )
        for k in range(100)
        for s in base.segments
    ]
    segs[50_000] = replace(segs[50_000], chainage_start_m=segs[50_000].chainage_start_m - 5.0)
    problems = find_layout_problems(replace(base, segments=tuple(segs)))
    assert [p.kind for p in problems] == ["overlap"]
    assert problems[0].second_id == segs[50_000].id


@pytest.mark.parametrize("n", [0, 1])
def test_nothing_to_compare(n) -> None:
    assert find_layout_problems(make_corridor([make_segment(i) for i in range(n)])) == []
