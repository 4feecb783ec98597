"""The interface's pure parts: where a new segment goes, which lines a view shows, path
completion, units in words and a swapped preset in a comparison."""

from __future__ import annotations

import dataclasses
from pathlib import Path

import pytest

from screening import engine, store
from screening.corridor.diff import diff_corridors
from screening.corridor.layout import find_layout_problems
from screening.model.presets import demo_corridor_path, load_presets
from screening.model.units import Display, in_words
from screening.tui.completion import path_matches
from screening.tui.placing import chainage_order, place_after
from screening.tui.screens.compare import collapsed_changes
from screening.tui.view import View, walls_in_order


@pytest.fixture(scope="module")
def demo():
    return store.load(demo_corridor_path())


def test_place_after_fills_a_gap_and_never_overlaps(demo):
    """Segments of one wall must not overlap (the file format's rule)."""
    segs = list(chainage_order(demo.segments))
    c = dataclasses.replace(demo, segments=tuple(segs))
    # contiguous neighbour: the new one goes to the wall's end
    p = place_after(c, 0, 10.0)
    wall_end = max(s.chainage_end_m for s in segs if s.wall == segs[0].wall)
    assert (p.start_m, p.end_m) == (wall_end, wall_end + 10.0) and "end of the wall" in p.words
    # a 4 m gap after segment 0: filled, shortened to 4 m
    segs[1] = dataclasses.replace(segs[1], chainage_start_m=segs[0].chainage_end_m + 4.0)
    c = dataclasses.replace(demo, segments=tuple(segs))
    p = place_after(c, 0, 10.0)
    assert (p.start_m, p.end_m) == (segs[0].chainage_end_m, segs[0].chainage_end_m + 4.0)
    new = dataclasses.replace(segs[0], id="NEW", chainage_start_m=p.start_m, chainage_end_m=p.end_m)
    after = dataclasses.replace(c, segments=(*segs, new))
    assert not [x for x in find_layout_problems(after) if x.kind == "overlap"]


def test_order_is_wall_by_wall_each_in_chainage(demo):
    order = chainage_order(tuple(reversed(demo.segments)))
    walls = [s.wall for s in order]
    assert walls == sorted(walls, key=walls.index)  # each wall's segments together
    for w in set(walls):
        starts = [s.chainage_start_m for s in order if s.wall == w]
        assert starts == sorted(starts)


def test_view_rows_filter_sort_and_fold(demo):
    result = engine.screen(demo, extra_checks=())
    rows = View().rows(demo, result)
    assert [r.wall for r in rows if r.index is None] == walls_in_order(demo)
    assert sorted(r.index for r in rows if r.index is not None) == list(range(len(demo.segments)))
    folded = View(collapsed=frozenset({demo.segments[0].wall})).rows(demo, result)
    assert all(r.wall != demo.segments[0].wall or r.index is None for r in folded)
    refer = View(verdicts=frozenset({"refer"}), grouped=False).rows(demo, result)
    assert [r.index for r in refer] == [i for i, v in enumerate(result.verdict) if v == "refer"]
    by_l = View(sort="length", descending=True, grouped=False).rows(demo, result)
    lengths = [float(result.length_m[r.index]) for r in by_l]
    assert lengths == sorted(lengths, reverse=True)


def test_path_matches_folders_and_suffixes(tmp_path: Path):
    (tmp_path / "north.toml").write_text("")
    (tmp_path / "north.csv").write_text("")
    (tmp_path / "nested").mkdir()
    assert path_matches(f"{tmp_path}/n", (".toml",)) == [
        f"{tmp_path}/nested/",
        f"{tmp_path}/north.toml",
    ]
    assert path_matches(f"{tmp_path}/zz") == []
    assert path_matches(f"{tmp_path}/missing/x") == []


def test_quantities_in_words_follow_the_units():
    """1 ft = 0.3048 m; 1 psf = 0.04788 kPa [NIST SP 811 (2008), Appendix B]."""
    us = Display("us")
    text = in_words("L = 3.0 m (0.71H); traffic 12 kPa; CDR 0.98; layer 3 at 2.63 m", us)
    assert "L = 9.8 ft" in text and "250.6 psf" in text and "8.63 ft" in text
    assert "CDR 0.98" in text and "0.71H" in text  # ratios and names untouched
    assert in_words("L = 3.0 m", Display("si")) == "L = 3.0 m"


def test_a_swapped_preset_reads_as_one_line(demo):
    presets = load_presets()
    segs = list(demo.segments)
    was = segs[0].reinforcement.id
    new = "geogrid" if was != "geogrid" else "steel-strip"
    segs[0] = dataclasses.replace(segs[0], reinforcement=presets.reinforcement[new])
    diff = diff_corridors(demo, dataclasses.replace(demo, segments=tuple(segs)))
    (changed,) = list(diff)
    assert len(changed.inputs) > 3  # every value of the family differs ...
    assert collapsed_changes(changed.inputs, Display("si")) == [("reinforcement", was, new)]
