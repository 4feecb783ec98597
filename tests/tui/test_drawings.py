"""The cross-section sketch and the long-section strip, read back from their characters.

The drawings must be to scale and complete: what they show is checked against the
engine's result for the same segment (layer count, length, line of maximum tension)."""

from __future__ import annotations

import dataclasses
import re

import numpy as np
import pytest

from screening import engine
from screening.tui.app import open_session
from screening.tui.sketch import CELL_ASPECT, draw_section
from screening.tui.widgets.long_section import GAP, column_chainages, section_text

W, H = 72, 26


@pytest.fixture(scope="module")
def demo():
    return open_session(None).corridor


def screened(corridor, i: int, **changes):
    seg = dataclasses.replace(corridor.segments[i], **changes)
    one = dataclasses.replace(corridor, segments=(seg,))
    return seg, engine.screen(one).segment(0)


def layer_rows(lines: list[str], face: int) -> list[int]:
    """Rows where a layer runs from the facing (the tension mark may sit on it)."""
    back = [ln.find("┊") for ln in lines if "┊" in ln][0]
    return [
        r
        for r, ln in enumerate(lines)
        if ln[face + 1 : back].replace("•", "─") == "─" * (back - face - 1)
    ]


def grid(text) -> list[str]:
    lines = text.plain.split("\n")
    assert len(lines) == H and all(len(line) == W for line in lines)
    return lines


def test_layers_facing_and_length_to_scale(demo):
    tall = int(np.argmax([s.exposed_height_m for s in demo.segments]))
    seg, res = screened(demo, tall)
    lines = grid(draw_section(seg, res, W, H))
    face = lines[next(r for r, ln in enumerate(lines) if "█" in ln)].index("█")
    facing_rows = [r for r, ln in enumerate(lines) if ln[face] == "█"]
    rows = layer_rows(lines, face)
    assert len(rows) == len(res.layers)  # every layer drawn, none invented
    lengths = {len(re.match("[─•]*", lines[r][face + 1 :]).group()) for r in rows}
    assert len(lengths) == 1  # uniform length over the height (METHOD §1, common practice)
    # to scale: columns of L over rows of H match L/H with a cell twice as tall as wide
    cols_l, rows_h = lengths.pop(), len(facing_rows) - 1
    assert cols_l / (rows_h * CELL_ASPECT) == pytest.approx(res.length_ratio, rel=0.15)


def test_line_of_maximum_tension_passes_through_each_layer(demo):
    seg, res = screened(demo, 3)
    lines = grid(draw_section(seg, res, W, H))
    face = lines[next(r for r, ln in enumerate(lines) if "█" in ln)].index("█")
    back = [ln.find("┊") for ln in lines if "┊" in ln][0]
    scale = res.length_m / (back - face)  # metres per column
    for r, layer in zip(layer_rows(lines, face), res.layers, strict=True):
        col = lines[r].find("•")
        if layer.active_length_m < scale and col == -1:  # at the facing: hidden behind it
            continue
        assert col > face
        assert (col - face) * scale == pytest.approx(layer.active_length_m, abs=1.5 * scale)


def ground_row(lines: list[str], col: int) -> int:
    """Row of the ground line in column ``col`` (heavy line or a low/high eighth block)."""
    return next(r for r, ln in enumerate(lines) if ln[col] in "━▁▔")


def test_backslope_toe_slope_and_traffic_are_drawn(demo):
    i = next(k for k, s in enumerate(demo.segments) if s.traffic != "none")
    seg, res = screened(demo, i, backslope_deg=0.0, toe_slope_deg=0.0)
    level = draw_section(seg, res, W, H)
    lines = grid(level)
    face = lines[next(r for r, ln in enumerate(lines) if "█" in ln)].index("█")
    assert ground_row(lines, face + 1) == ground_row(lines, W - 1)  # level behind
    assert ground_row(lines, 0) == ground_row(lines, face - 1)  # level in front
    assert res.traffic_kpa > 0 and "↓" in level.plain
    assert f"traffic {res.traffic_kpa:.0f} kPa" in level.plain
    assert f"d {res.embedment_m:.2f} m" in level.plain
    seg, res = screened(demo, i, backslope_deg=18.0, toe_slope_deg=15.0, traffic="none")
    sloped = draw_section(seg, res, W, H)
    lines = grid(sloped)
    face = lines[next(r for r, ln in enumerate(lines) if "█" in ln)].index("█")
    assert ground_row(lines, W - 1) < ground_row(lines, face + 1) - 1  # rises behind
    assert ground_row(lines, 0) > ground_row(lines, face - 1)  # falls away in front
    assert "↓" not in sloped.plain


def test_long_section_names_the_tallest_input_not_the_tallest_column(demo):
    """The label's height is the wall's tallest segment end as typed, at any width: the
    columns sample the profile between segment ends, so a segment rising to 7.0 m at its
    start may be drawn from 6.9 m on (what the label read before)."""
    i = next(k for k, s in enumerate(demo.segments) if s.id == "R-05")
    segs = list(demo.segments)
    segs[i] = dataclasses.replace(segs[i], height_start_m=7.0)
    taller = dataclasses.replace(demo, segments=tuple(segs))
    for width in range(90, 161, 7):
        text = section_text(taller, None, i, width, 8).plain.split("\n")
        assert text[-1].rstrip().endswith("max exposed 7.0 m"), width


def test_long_section_compresses_gaps_and_marks_the_cursor(demo):
    result = engine.screen(demo)
    start = np.array([s.chainage_start_m for s in demo.segments])
    end = np.array([s.chainage_end_m for s in demo.segments])
    x, starts = column_chainages(start, end, 150)
    gaps = np.isnan(x)
    assert gaps.sum() == GAP * (len(starts) - 1)
    assert np.all(np.diff(x[~gaps]) > 0)  # chainage grows left to right
    for cursor in range(len(demo.segments)):
        wall = demo.segments[cursor].wall
        rows = [i for i, s in enumerate(demo.segments) if s.wall == wall]
        text = section_text(demo, result, cursor, 150, 8).plain.split("\n")
        assert len(text) == 8
        marks = text[-3]
        # only the cursor's wall: a wall beside it at the same chainage is not merged in
        for v, mark in (("clear", "○"), ("marginal", "◑"), ("refer", "●")):
            assert (mark in marks) == (v in [result.verdict[i] for i in rows])
        assert demo.segments[cursor].id in text[-2]
        tallest = max(demo.segments[i].exposed_height_m for i in rows)
        assert text[-1].rstrip().endswith(f"{wall} · max exposed {tallest:.1f} m")
