"""Corridor operations driven by keys: bulk edit of a range, split, delete with undo and
redo, add, copy, order, factor-set switch. After each, every row and the summary are
compared with an independent full run of ``engine.screen`` on the same inputs."""

from __future__ import annotations

import dataclasses
from pathlib import Path

from screening.tui.screens.choose import ChooseScreen
from screening.tui.screens.prompt import PromptScreen

from .conftest import make_app
from .test_workflows import SIZE, goto, rows_match_fresh_screen, settle, summary


async def test_bulk_edit_of_a_marked_range(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        before = screen.session.corridor.segments
        await goto(pilot, app, 1)
        await pilot.press("space", "down", "down", "down", "b")
        await pilot.pause()
        chooser = app.screen
        assert isinstance(chooser, ChooseScreen)
        options = chooser.query_one("#choices")
        options.highlighted = [v for v, _ in chooser.options].index("traffic")
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, PromptScreen)
        await pilot.press("home", "ctrl+k", *"12.5", "enter")
        await pilot.pause()
        after = screen.session.corridor.segments
        assert [s.traffic for s in after[1:5]] == [12.5] * 4
        assert after[0] is before[0] and after[5:] == before[5:]
        await rows_match_fresh_screen(pilot, app)
        assert screen.anchor is None  # the range is cleared once applied


async def test_bulk_edit_of_a_preset_offers_only_the_presets(corridor_file: Path):
    """A preset field is picked from the list of presets, so an unknown id cannot be set."""
    from screening.model.presets import load_presets

    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        await goto(pilot, app, 0)
        await pilot.press("space", "down", "b")
        await pilot.pause()
        chooser = app.screen
        chooser.query_one("#choices").highlighted = [v for v, _ in chooser.options].index("fill")
        await pilot.press("enter")
        await pilot.pause()
        values = app.screen
        assert isinstance(values, ChooseScreen)
        assert [v for v, _ in values.options] == list(load_presets().fills)
        values.query_one("#choices").highlighted = [v for v, _ in values.options].index(
            "crushed-rock"
        )
        await pilot.press("enter")
        await pilot.pause()
        segs = screen.session.corridor.segments
        assert [s.fill.id for s in segs[:2]] == ["crushed-rock"] * 2
        await rows_match_fresh_screen(pilot, app)


async def test_split_at_a_chainage(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        n = len(screen.session.corridor.segments)
        seg = screen.session.corridor.segments[1]
        at = seg.chainage_start_m + 0.25 * seg.length_along_m
        await goto(pilot, app, 1)
        await pilot.press("s")
        await pilot.pause()
        await pilot.press("home", "ctrl+k", *f"{seg.chainage_end_m + 1:g}", "enter")
        await pilot.pause()
        assert isinstance(app.screen, PromptScreen)  # outside the segment: refused
        await pilot.press("home", "ctrl+k", *f"{at:g}", "enter")
        await pilot.pause()
        segs = screen.session.corridor.segments
        assert len(segs) == n + 1
        first, second = segs[1], segs[2]
        assert (first.id, first.chainage_start_m, first.chainage_end_m) == (
            seg.id,
            seg.chainage_start_m,
            at,
        )
        assert (second.chainage_start_m, second.chainage_end_m) == (at, seg.chainage_end_m)
        # linear interpolation of the exposed height along the segment (common practice)
        expected = seg.height_start_m + 0.25 * (seg.height_end_m - seg.height_start_m)
        assert abs(first.height_end_m - expected) < 1e-3
        assert second.height_start_m == first.height_end_m
        await rows_match_fresh_screen(pilot, app)


async def test_delete_then_undo_and_redo(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        original = screen.session.corridor
        gone = original.segments[2].id
        await goto(pilot, app, 2)
        await pilot.press("x")
        await pilot.pause()
        ids = [s.id for s in screen.session.corridor.segments]
        assert gone not in ids and len(ids) == len(original.segments) - 1
        await rows_match_fresh_screen(pilot, app)
        await pilot.press("u")
        await pilot.pause()
        assert screen.session.corridor is original
        await rows_match_fresh_screen(pilot, app)
        assert not screen.session.dirty  # back to what the file holds
        await pilot.press("ctrl+y")
        await pilot.pause()
        assert gone not in [s.id for s in screen.session.corridor.segments]
        await rows_match_fresh_screen(pilot, app)


async def test_factor_set_switch_updates_every_verdict(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        await pilot.press("f")
        await pilot.pause()
        chooser = app.screen
        assert isinstance(chooser, ChooseScreen)
        chooser.query_one("#choices").highlighted = [v for v, _ in chooser.options].index("asd")
        await pilot.press("enter")
        await pilot.pause()
        assert screen.session.corridor.factor_set.id == "asd"
        assert "factor set asd" in summary(app)
        await rows_match_fresh_screen(pilot, app)
        await pilot.press("u")
        await pilot.pause()
        assert "factor set aashto-lrfd" in summary(app)
        await rows_match_fresh_screen(pilot, app)


async def test_add_and_copy_never_overlap_a_neighbour(corridor_file: Path):
    """Add continues the wall at the end of the last segment; a copy of a segment whose
    next chainage is taken goes to the wall's end. Segments of one wall must not overlap
    (the file format's own rule), so lengths and costs are never counted twice."""
    from screening.corridor.layout import find_layout_problems

    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        n = len(screen.session.corridor.segments)
        last = screen.session.corridor.segments[-1]
        await pilot.press("ctrl+end", "a")
        await pilot.pause()
        segs = screen.session.corridor.segments
        assert len(segs) == n + 1 and segs[-1].chainage_start_m == last.chainage_end_m
        assert segs[-1].id not in {s.id for s in segs[:-1]}
        first = segs[0]
        ids = {s.id for s in segs}
        wall_end = max(s.chainage_end_m for s in segs if s.wall == first.wall)
        await goto(pilot, app, 0)
        said: list[str] = []
        speak = screen.say
        screen.say = lambda message, style="": (said.append(message), speak(message, style))
        await pilot.press("c")
        await pilot.pause()
        screen.say = speak
        segs = screen.session.corridor.segments
        copy = next(s for s in segs if s.id not in ids and s.wall == first.wall)
        assert len(segs) == n + 2
        assert copy.chainage_start_m == wall_end  # the chainage after it was taken
        # what the status line said (a fast screen may already have written over it)
        assert any("end of the wall" in m for m in said)
        assert not [p for p in find_layout_problems(screen.session.corridor) if p.kind == "overlap"]
        await rows_match_fresh_screen(pilot, app)


async def test_sort_by_chainage_puts_the_file_in_order(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        s = screen.session
        shuffled = tuple(reversed(s.corridor.segments))
        s.corridor = dataclasses.replace(s.corridor, segments=shuffled)
        screen.table.load(s, screen.view, 0)
        await pilot.press("o")
        await pilot.pause()
        chooser = app.screen
        assert isinstance(chooser, ChooseScreen)
        await pilot.press("enter")  # the first option: chainage along each wall
        await pilot.pause()
        segs = s.corridor.segments
        for wall in {x.wall for x in segs}:
            starts = [x.chainage_start_m for x in segs if x.wall == wall]
            assert starts == sorted(starts)
        await rows_match_fresh_screen(pilot, app)
