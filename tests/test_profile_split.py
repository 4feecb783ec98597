"""Properties of the split of a profile into segments, over generated profiles.

The rules are ours (screening/profile/split.py docstring): no segment spans more than the
height step, none is longer than the maximum, none hides a high point above its ends,
and together they cover exactly the stretches where the wall has height. Checked on the
profile points themselves, so a wrong cut anywhere fails.
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from screening.profile.split import split_profile, wall_code

ROUND = 2e-3  # ends are rounded to the millimetre


@st.composite
def profiles(draw):
    n = draw(st.integers(2, 12))
    gaps = draw(
        st.lists(st.sampled_from([0.0, 0.5, 3.0, 7.5, 20.0, 45.0]), min_size=n - 1, max_size=n - 1)
    )
    if all(g == 0.0 for g in gaps):
        gaps[0] = 10.0
    ch = np.concatenate([[100.0], 100.0 + np.cumsum(gaps)])
    heights = draw(
        st.lists(
            st.one_of(st.just(0.0), st.floats(0.0, 12.0, allow_nan=False)), min_size=n, max_size=n
        )
    )
    # no three points at one chainage (a step is two)
    for k in range(2, n):
        if ch[k] == ch[k - 1] == ch[k - 2]:
            ch[k:] += 1.0
    return ch, np.array(heights)


@settings(max_examples=300, deadline=None)
@given(
    profiles(),
    st.sampled_from([0.25, 0.5, 1.0, 3.0]),
    st.sampled_from([5.0, 12.5, 30.0]),
)
def test_split_keeps_every_rule(profile, step, max_len):
    ch, h = profile
    pieces = split_profile(ch, h, max_step_m=step, max_length_m=max_len, peak_tolerance_m=0.05)
    # ends are rounded to 1 mm and slivers under 1 mm join their neighbour: on a steep
    # stretch that moves a height by up to the slope times a few millimetres
    run = np.diff(ch)
    slope = np.abs(np.diff(h))[run > 0] / run[run > 0]
    tol = ROUND + 3e-3 * (slope.max() if slope.size else 0.0)
    for c0, c1, h0, h1 in pieces:
        assert c1 > c0
        assert c1 - c0 <= max_len + ROUND
        inside = h[(ch > c0 + 1e-6) & (ch < c1 - 1e-6)]
        values = np.concatenate([[h0, h1], inside])
        assert values.max() - values.min() <= step + tol
        assert values.max() <= max(h0, h1) + 0.05 + tol
    for (_, a1, _, ah1), (b0, _, bh0, _) in zip(pieces, pieces[1:], strict=False):
        assert b0 >= a1 - 1e-9  # in order, no overlap
        if b0 == a1 and ch[np.isclose(ch, a1)].size < 2:  # shared end off a step: same height
            assert ah1 == bh0
    # coverage: exactly the stretches where the wall has height
    walled = sum(
        b - a
        for a, b, ha, hb in zip(ch[:-1], ch[1:], h[:-1], h[1:], strict=True)
        if max(ha, hb) > 1e-6
    )
    assert sum(c1 - c0 for c0, c1, _, _ in pieces) == pytest.approx(
        walled, abs=ROUND * (len(pieces) + 1)
    )


def test_breaks_outside_the_profile_are_ignored_and_one_on_a_point_cuts_there():
    assert split_profile([0, 10, 20], [1, 1, 1], breaks_m=[-5, 10, 99]) == [
        (0.0, 10.0, 1.0, 1.0),
        (10.0, 20.0, 1.0, 1.0),
    ]


def test_a_step_in_the_wall_top_is_a_segment_end():
    assert split_profile([0, 10, 10, 20], [1, 1, 3, 3]) == [
        (0.0, 10.0, 1.0, 1.0),
        (10.0, 20.0, 3.0, 3.0),
    ]


def test_wall_codes_are_short_and_unique():
    assert wall_code("W2") == "W2"
    assert wall_code("East approach, ramp") == "EAR"
    assert wall_code("East approach", taken=["EA"]) == "EA2"
    assert wall_code("") == "W"


@settings(max_examples=60, deadline=None)
@given(profiles(), st.sampled_from([0.25, 0.5, 1.0]), st.sampled_from([12.5, 30.0]))
def test_every_profile_corridor_is_a_valid_file(profile, step, max_len):
    """Whatever the profile, the corridor it gives must load back from its own file:
    unique ids, no overlaps within a wall, every segment at least one spacing high."""
    from screening import store
    from screening.model.presets import load_presets
    from screening.profile.build import segments_from_lines, starting_defaults
    from screening.profile.split import ProfileLine

    ch, h = profile
    if h.max() < 1.0:
        h = h + 1.0  # a wall somewhere, so there is a corridor to write
    defaults = starting_defaults()
    lines = [
        ProfileLine("A", "left", tuple(ch), tuple(h)),
        ProfileLine("A", "right", tuple(ch), tuple(h[::-1])),
    ]
    segs = segments_from_lines(lines, defaults, max_step_m=step, max_length_m=max_len)
    if not segs:
        return
    presets = load_presets()
    from screening.model import Corridor

    c = Corridor("p", presets.factor_sets["aashto-lrfd"], defaults, segs, presets.rules)
    again = store.loads(store.dumps(c), "p.toml")
    assert again == c
