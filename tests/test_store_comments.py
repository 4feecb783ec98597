"""Comments a person typed in a corridor file survive a save (issue 14, item 4).

Our own contract, no engineering source. The written text is always read back with the
store and compared with the corridor that was saved, so keeping comments can never change
what the file says.
"""

from __future__ import annotations

import dataclasses
import re
from collections import Counter
from pathlib import Path

from screening import store
from screening.engine import screen
from screening.model.presets import demo_corridor_path
from screening.store.comments import carry_comments
from screening.store.writing import HEADER

DEMO = demo_corridor_path().read_text(encoding="utf-8")


def _comments(text: str) -> list[str]:
    """Every comment of a text written by the store or by hand (full-line or after a value),
    found by a plain regex: good enough here because the test texts put no # in strings."""
    out = []
    for line in text.splitlines():
        m = re.search(r"#.*$", line)
        if m and line.strip() not in {h.strip() for h in HEADER.splitlines()}:
            out.append(m.group().rstrip())
    return out


def test_the_demo_keeps_every_comment_through_a_save_with_its_screen(tmp_path: Path) -> None:
    path = tmp_path / "demo.toml"
    path.write_text(DEMO, encoding="utf-8")
    corridor = store.load(path)
    store.save(path, corridor, screen(corridor))
    text = path.read_text(encoding="utf-8")
    assert store.load(path) == corridor
    assert _comments(text) == _comments(DEMO)
    again = store.dumps(corridor, screen(corridor), comments_from=text)
    assert _comments(again) == _comments(DEMO), "saving twice neither loses nor doubles"


def test_edits_reorder_rename_and_delete(tmp_path: Path) -> None:
    corridor = store.loads(DEMO, "demo.toml")
    segs = list(corridor.segments)
    first, second, third = segs[0], segs[1], segs[2]
    segs[0], segs[1] = second, first  # reordered
    segs[2] = dataclasses.replace(third, id="WL-03-renamed", height_end_m=6.0)
    del segs[-1]  # the last segment is deleted, and with it its own comments
    edited = dataclasses.replace(corridor, segments=tuple(segs))
    out = store.dumps(edited, comments_from=DEMO)
    assert store.loads(out, "out.toml") == edited
    assert Counter(_comments(out)) == Counter(_comments(DEMO))  # the last one had none


TRAIL = """schema = "wallscreen/1"

[corridor]
name = "Ramp"  # working title
factor_set = "aashto-lrfd"

[defaults]
traffic = "approach"

# the ramp, from the junction
[[segment]]  # first
id = "R-1"
note = "pile #3 at the toe"
chainage_start_m = 0.0
# surveyed 2026-11
height_end_m = 3.0  # at the gantry
chainage_end_m = 10.0
height_start_m = 2.0
traffic = "approach"  # as the defaults say

[[segment]]
id = "R-2"
chainage_start_m = 10.0
chainage_end_m = 20.0
height_start_m = 3.0
height_end_m = 3.5
fill = { preset = "granular-wellgraded", friction_deg = 33.0 }  # tested
# the last words of the file
"""


def test_trailing_comments_follow_their_value_and_vanished_keys_keep_theirs() -> None:
    corridor = store.loads(TRAIL, "ramp.toml")
    segs = list(corridor.segments)
    segs[0] = dataclasses.replace(segs[0], height_end_m=3.25)
    edited = dataclasses.replace(corridor, segments=tuple(segs))
    out = store.dumps(edited, comments_from=TRAIL)
    assert store.loads(out, "out.toml") == edited
    lines = out.splitlines()
    assert 'name = "Ramp"  # working title' in lines
    assert "height_end_m = 3.25  # at the gantry" in lines
    assert lines[lines.index("height_end_m = 3.25  # at the gantry") - 1] == "# surveyed 2026-11"
    assert "[[segment]]  # first" in lines
    assert lines[lines.index("[[segment]]  # first") - 1] == "# the ramp, from the junction"
    # traffic equals [defaults], so the store no longer writes it: its comment stays with R-1
    assert "# as the defaults say" in lines
    assert lines.index("# as the defaults say") < lines.index('id = "R-2"')
    assert lines[-1] == "# the last words of the file"
    assert out.count("#3") == 1  # a # inside text is text
    assert Counter(c for c in _comments(out) if "#3" not in c) == Counter(
        c for c in _comments(TRAIL) if "#3" not in c
    )


def test_a_file_that_is_not_a_corridor_gives_no_comments(tmp_path: Path) -> None:
    other = tmp_path / "other.toml"
    other.write_text("# someone else's settings\n[tool]\nx = 1\n", encoding="utf-8")
    corridor = store.loads(TRAIL, "ramp.toml")
    store.save(other, corridor)
    assert "someone else" not in other.read_text(encoding="utf-8")
    assert store.load(other) == corridor


def test_save_as_takes_the_comments_of_the_file_that_was_opened(tmp_path: Path) -> None:
    opened = tmp_path / "ramp.toml"
    opened.write_text(TRAIL, encoding="utf-8")
    corridor = store.load(opened)
    copy = tmp_path / "ramp-copy.toml"
    store.save(copy, corridor, comments_from=opened)
    assert "# at the gantry" in copy.read_text(encoding="utf-8")


def test_comments_inside_a_multi_line_array_stay_with_its_key() -> None:
    old = store.dumps(store.loads(DEMO, "demo.toml"), screen(store.loads(DEMO, "demo.toml")))
    marked = old.replace("reasons = [\n", "reasons = [  # why\n    # the first reason\n", 1)
    corridor = store.loads(marked, "marked.toml")
    out = carry_comments(marked, store.dumps(corridor, screen(corridor)), HEADER)
    assert store.loads(out, "out.toml") == corridor
    assert out.count("# why") == 1 and out.count("# the first reason") == 1
    where = out.index("# the first reason")
    assert out.index("reasons = [", where) > where  # above the key now, not inside its value


def test_a_deleted_segment_takes_its_own_comments_only() -> None:
    corridor = store.loads(TRAIL, "ramp.toml")
    edited = dataclasses.replace(corridor, segments=corridor.segments[:1])
    out = store.dumps(edited, comments_from=TRAIL)
    assert store.loads(out, "out.toml") == edited
    assert "# tested" not in out
    assert "# at the gantry" in out and out.rstrip().endswith("# the last words of the file")


def test_a_new_corridor_over_an_old_file_takes_none_of_its_comments(tmp_path: Path) -> None:
    path = tmp_path / "ramp.toml"
    path.write_text(TRAIL, encoding="utf-8")
    store.save(path, store.loads(TRAIL, "ramp.toml"), keep_comments=False)
    assert "#" not in path.read_text(encoding="utf-8").replace(HEADER, "").replace("#3", "")
