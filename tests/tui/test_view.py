"""What the corridor table shows, driven by keys: walls grouped with a summary line,
folding, filters by wall, verdict and text, a sort by any column, marked ranges held to
one wall, the list of overlaps and gaps. Every check compares what is drawn with the
corridor's inputs or an independent full run of ``engine.screen``."""

from __future__ import annotations

from pathlib import Path

from screening import engine
from screening.tui.screens.choose import ChooseScreen
from screening.tui.screens.prompt import PromptScreen
from screening.tui.view import margin_of, search_text, walls_in_order

from .conftest import make_app
from .test_workflows import SIZE, goto, settle


def shown_ids(app) -> list[str]:
    table = app.corridor_screen.table
    segs = app.corridor_screen.session.corridor.segments
    return [segs[line.index].id for line in table.lines if line.index is not None]


def wall_lines(app) -> list[str]:
    return [line.wall for line in app.corridor_screen.table.lines if line.index is None]


async def choose(pilot, app, value: str) -> None:
    chooser = app.screen
    assert isinstance(chooser, ChooseScreen)
    chooser.query_one("#choices").highlighted = [v for v, _ in chooser.options].index(value)
    await pilot.press("enter")
    await pilot.pause()


async def test_walls_are_grouped_each_under_its_summary_line(corridor_file: Path):
    """Each wall's segments come together under one line that counts its verdicts; walls at
    the same chainage (both sides of an approach) are never interleaved."""
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        corridor = app.corridor_screen.session.corridor
        fresh = engine.screen(corridor)
        assert wall_lines(app) == walls_in_order(corridor)
        table = app.corridor_screen.table
        for k, line in enumerate(table.lines):
            if line.index is not None:
                continue
            members = [i for i, s in enumerate(corridor.segments) if s.wall == line.wall]
            cells = [c.plain for c in table.get_row_at(k)]
            assert cells[0].endswith(line.wall[:8]) or line.wall[:8] in cells[0]
            for verdict, mark in (("refer", "●"), ("marginal", "◑"), ("clear", "○")):
                n = sum(fresh.verdict[i] == verdict for i in members)
                assert (f"{mark}{n}" in cells[1]) == (n > 0)
            cdrs = [margin_of(fresh, i)[1] for i in members]
            cdrs = [c for c in cdrs if c is not None]
            if cdrs:
                assert float(cells[2]) <= min(cdrs) + 1e-9
            # the segments right under it are all of that wall, in chainage order
            below = []
            for nxt in table.lines[k + 1 :]:
                if nxt.index is None:
                    break
                below.append(nxt.index)
            assert below == sorted(members, key=lambda i: corridor.segments[i].chainage_start_m)


async def test_fold_one_wall_then_all_then_ungroup(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        corridor = app.corridor_screen.session.corridor
        first = corridor.segments[0].wall
        await goto(pilot, app, 0)
        await pilot.press("z")
        await pilot.pause()
        assert first in app.corridor_screen.view.collapsed
        assert not {s.id for s in corridor.segments if s.wall == first} & set(shown_ids(app))
        await pilot.press("enter")  # on the folded wall's line: unfold
        await pilot.pause()
        assert not app.corridor_screen.view.collapsed
        await pilot.press("Z")
        await pilot.pause()
        assert shown_ids(app) == [] and wall_lines(app) == walls_in_order(corridor)
        await pilot.press("Z")
        await pilot.pause()
        assert len(shown_ids(app)) == len(corridor.segments)
        await pilot.press("g")
        await pilot.pause()
        assert wall_lines(app) == [] and len(shown_ids(app)) == len(corridor.segments)


async def test_filters_by_wall_verdict_and_text_then_escape_shows_all(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        corridor = app.corridor_screen.session.corridor
        fresh = engine.screen(corridor)
        wall = walls_in_order(corridor)[1]
        await pilot.press("w")
        await pilot.pause()
        await choose(pilot, app, wall)
        assert shown_ids(app) == [s.id for s in corridor.segments if s.wall == wall]
        await pilot.press("escape")
        await pilot.pause()
        await pilot.press("V")
        await pilot.pause()
        await choose(pilot, app, "refer")
        assert shown_ids(app) == [
            s.id for i, s in enumerate(corridor.segments) if fresh.verdict[i] == "refer"
        ]
        await pilot.press("escape")
        await pilot.pause()
        note = next(s for s in corridor.segments if s.note)
        word = note.note.split()[0]
        await pilot.press("slash")
        await pilot.pause()
        assert isinstance(app.screen, PromptScreen)
        await pilot.press(*word, "enter")
        await pilot.pause()
        assert note.id in shown_ids(app)
        shown = set(shown_ids(app))
        for i, s in enumerate(corridor.segments):
            assert (s.id in shown) == (word.lower() in search_text(corridor, fresh, i))
        await pilot.press("escape")
        await pilot.pause()
        assert len(shown_ids(app)) == len(corridor.segments)


async def test_sort_by_a_column_and_again_reverses(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        corridor = app.corridor_screen.session.corridor
        fresh = engine.screen(corridor)
        await pilot.press("g")  # one flat list: the sort runs over the whole corridor
        await pilot.press("o")
        await pilot.pause()
        await choose(pilot, app, "length")
        lengths = [float(fresh.length_m[fresh.index(i)]) for i in shown_ids(app)]
        assert lengths == sorted(lengths)
        await pilot.press("o")
        await pilot.pause()
        await choose(pilot, app, "length")
        lengths = [float(fresh.length_m[fresh.index(i)]) for i in shown_ids(app)]
        assert lengths == sorted(lengths, reverse=True)
        assert "sorted by L m ↓" in str(app.corridor_screen.query_one("#status").content)


async def test_a_marked_range_stays_within_one_wall(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        corridor = screen.session.corridor
        wall = corridor.segments[0].wall
        await goto(pilot, app, 0)
        await pilot.press("space", *["down"] * 14)  # well past the end of the first wall
        await pilot.pause()
        marked = screen.selected_rows()
        assert len(marked) > 1
        assert {corridor.segments[i].wall for i in marked} == {wall}
        assert marked == [i for i, s in enumerate(corridor.segments) if s.wall == wall]


async def test_bulk_edit_on_a_wall_line_edits_that_wall(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        before = screen.session.corridor.segments
        wall = walls_in_order(screen.session.corridor)[1]
        screen.table.move_cursor(row=screen.table.wall_line[wall])
        await pilot.press("b")
        await pilot.pause()
        await choose(pilot, app, "surcharge_kpa")
        await pilot.press("home", "ctrl+k", *"7.5", "enter")
        await pilot.pause()
        after = screen.session.corridor.segments
        for a, b in zip(before, after, strict=True):
            assert b.surcharge_kpa == (7.5 if a.wall == wall else a.surcharge_kpa)


async def test_layout_problems_are_listed_and_marked(corridor_file: Path):
    """A deleted middle segment leaves a gap: both neighbours get the mark, ! lists the gap
    with both ids and its chainages, and Enter goes there."""
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        segs = screen.session.corridor.segments
        gone, before, after = segs[2], segs[1], segs[3]
        await goto(pilot, app, 2)
        await pilot.press("x")
        await pilot.pause()
        await pilot.press("exclamation_mark")
        await pilot.pause()
        chooser = app.screen
        assert isinstance(chooser, ChooseScreen)
        words = chooser.options[0][1]
        assert before.id in words and after.id in words
        assert f"{gone.chainage_start_m:g}" in words and f"{gone.chainage_end_m:g}" in words
        await pilot.press("enter")
        await pilot.pause()
        assert screen.session.corridor.segments[screen.cursor].id == before.id
        assert "layout problem" in screen.query_one("#summary").content.plain
