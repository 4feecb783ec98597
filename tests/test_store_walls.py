"""``wall`` is optional on a segment: ``[defaults] wall``, else the corridor's name.

Our own file contract (issue 13, a file of one wall need not repeat its name), no
engineering source.
"""

from __future__ import annotations

import tomllib

from screening import store
from screening.model.errors import InputError

HEAD = 'schema = "wallscreen/1"\n[corridor]\nname = "  Ramp B  "\n'


def _segment(sid: str, start: float, wall: str | None = None) -> str:
    w = f'wall = "{wall}"\n' if wall is not None else ""
    return (
        f'[[segment]]\nid = "{sid}"\n{w}chainage_start_m = {start}\n'
        f"chainage_end_m = {start + 10}\nheight_start_m = 3.0\nheight_end_m = 3.0\n"
    )


def test_a_segment_without_wall_is_on_the_corridor_named_wall() -> None:
    c = store.loads(HEAD + _segment("B-1", 0) + _segment("B-2", 10, "North"), "w.toml")
    assert [s.wall for s in c.segments] == ["Ramp B", "North"]
    assert c.default_wall == "Ramp B"


def test_defaults_wall_wins_over_the_corridor_name() -> None:
    text = HEAD + '[defaults]\nwall = "South"\n' + _segment("B-1", 0)
    c = store.loads(text, "w.toml")
    assert c.segments[0].wall == "South" and c.defaults.wall == "South"


def test_round_trip_writes_wall_only_where_it_differs() -> None:
    for head in (HEAD, HEAD + '[defaults]\nwall = "South"\n'):
        c = store.loads(head + _segment("B-1", 0) + _segment("B-2", 10, "North"), "w.toml")
        text = store.dumps(c)
        assert store.loads(text, "again.toml") == c
        doc = tomllib.loads(text)
        assert "wall" not in doc["segment"][0] and doc["segment"][1]["wall"] == "North"


def test_an_empty_defaults_wall_is_refused() -> None:
    try:
        store.loads(HEAD + '[defaults]\nwall = " "\n', "w.toml")
    except InputError as err:
        assert str(err) == "w.toml:5:8: [defaults] wall: must not be empty"
    else:
        raise AssertionError("an empty wall name must be refused")
