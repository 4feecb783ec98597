"""Inline tables repeated across segments are read once; a table that differs in any way,
even only in its TOML type, is read (and refused) where it stands.

Our own contract (DESIGN.md: a bad value names its file, line, segment and field), no
engineering source.
"""

from __future__ import annotations

import pytest

from screening import store
from screening.model.errors import InputError

HEAD = """schema = "wallscreen/1"
[corridor]
name = "Repeated tables"
"""
SEGMENT = """
[[segment]]
id = "{id}"
chainage_start_m = {c0}
chainage_end_m = {c1}
height_start_m = 4.0
height_end_m = 4.0
reinforcement = {{ preset = "geogrid", spacing_m = {spacing} }}
foundation = {{ unit_weight_kn_m3 = 19.0, friction_deg = {phi}, cohesion_kpa = 0.0 }}
"""


def _text(rows) -> str:
    return HEAD + "".join(
        SEGMENT.format(id=f"A-{k}", c0=10.0 * k, c1=10.0 * k + 10.0, spacing=s, phi=p)
        for k, (s, p) in enumerate(rows)
    )


def test_repeated_tables_read_the_same_as_each_alone() -> None:
    rows = [("0.5", "30.0"), ("0.5", "30.0"), ("0.6", "30"), ("0.5", "30.0")]
    corridor = store.loads(_text(rows), "repeat.toml")
    alone = [store.loads(_text([row]), "one.toml").segments[0] for row in rows]
    for seg, single in zip(corridor.segments, alone, strict=True):
        assert seg.reinforcement == single.reinforcement
        assert seg.foundation == single.foundation
    assert corridor.segments[2].reinforcement.spacing_m == 0.6
    assert corridor.segments[2].foundation.friction_deg == 30.0  # an integer reads as a number


@pytest.mark.parametrize(
    ("good", "bad", "field", "words"),
    [
        (("0.5", "30.0"), ("'0.5'", "30.0"), "reinforcement.spacing_m", "expected a number"),
        # true == 1 in Python (and hashes alike): the file's types must still tell them apart
        (("1", "30.0"), ("true", "30.0"), "reinforcement.spacing_m", "expected a number"),
        (("0.5", "30.0"), ("0.5", "75.0"), "foundation.friction_deg", "75"),
    ],
)
def test_a_table_differing_only_in_its_value_fails_where_it_stands(good, bad, field, words) -> None:
    text = _text([good, good, bad])
    with pytest.raises(InputError) as err:
        store.loads(text, "repeat.toml")
    message = str(err.value)
    assert err.value.segment == "A-2" and err.value.field == field and words in message
    line = text.split("\n").index(
        next(s for s in text.split("\n")[::-1] if s.startswith(field.split(".")[0]))
    )
    assert err.value.line == line + 1
