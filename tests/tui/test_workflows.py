"""The terminal interface driven by keys, as a user would, checked on state and on what
is drawn. Each screen the interface shows is compared with an independent full run of
``engine.screen`` on the same inputs, so a wrong re-screen or a stale row fails."""

from __future__ import annotations

import dataclasses
import io
from pathlib import Path

from rich.console import Console

from screening import engine, store
from screening.engine.result import cdr_text
from screening.tui.cells import KEYS, VERDICT_MARK
from screening.tui.screens.detail import DetailScreen
from screening.tui.screens.prompt import PromptScreen
from screening.tui.screens.unsaved import UnsavedScreen
from screening.tui.view import margin_of
from screening.tui.widgets.cross_section import CrossSection
from screening.tui.widgets.summary_bar import SummaryBar

from .conftest import make_app

SIZE = (160, 45)


def plain(renderable) -> str:
    """A Rich renderable as plain text, 150 columns wide."""
    console = Console(width=150, record=True, file=io.StringIO())
    console.print(renderable)
    return console.export_text()


COL = {key: i for i, key in enumerate(KEYS)}


def drawn(app, row: int, key: str) -> str:
    """Text of one cell of segment ``row``'s line of the corridor table, as drawn."""
    table = app.corridor_screen.table
    return table.get_row_at(table.position[row])[COL[key]].plain.strip()


async def goto(pilot, app, row: int) -> None:
    """Put the table's cursor on segment ``row`` (what arrow keys would do)."""
    screen = app.corridor_screen
    screen.table.move_to(screen.session, row)
    await pilot.pause()


def summary(app) -> str:
    return app.corridor_screen.query_one(SummaryBar).content.plain


async def settle(pilot, app) -> None:
    """Wait until every screen running in the background has landed."""
    for _ in range(400):
        await app.workers.wait_for_complete()
        await pilot.pause()
        if not app.corridor_screen.busy:
            return
    raise AssertionError("the corridor is still being screened")


async def rows_match_fresh_screen(pilot, app) -> None:
    """Every row and the summary agree with a fresh screen of the session's inputs."""
    await settle(pilot, app)
    corridor = app.corridor_screen.session.corridor
    fresh = engine.screen(corridor)
    from screening.corridor.layout import find_layout_problems

    near = {x for p in find_layout_problems(corridor) for x in (p.first_id, p.second_id)}
    for i in range(len(corridor.segments)):
        ident = drawn(app, i, "id")
        assert ident.removeprefix("⚠").strip() == corridor.segments[i].id
        assert ident.startswith("⚠") == (corridor.segments[i].id in near)  # gap or overlap
        assert drawn(app, i, "verdict") == f"{VERDICT_MARK[fresh.verdict[i]]} {fresh.verdict[i]}"
        assert drawn(app, i, "length") == f"{fresh.length_m[i]:.1f}"
        check, cdr = margin_of(fresh, i)
        assert drawn(app, i, "cdr") == ("-" if cdr is None else cdr_text(cdr))
        assert drawn(app, i, "margin") == (check or "-")
    for verdict, count in fresh.counts().items():
        assert f"{VERDICT_MARK[verdict]} {verdict} {count}" in summary(app)
    assert f"{len(corridor.segments)} segments" in summary(app)


async def open_editor_at(pilot, app, row: int, field_tabs: int) -> None:
    await goto(pilot, app, row)
    await pilot.press("e")
    await pilot.pause()
    for _ in range(field_tabs):
        await pilot.press("tab")


async def test_edit_height_updates_row_and_summary_then_save_and_reopen(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        row = 3
        before = screen.session.corridor.segments[row]
        await open_editor_at(pilot, app, row, 6)
        assert app.focused.id == "field-height_end_m"
        await pilot.press("home", "ctrl+k", *"9.5")
        await pilot.pause()
        after = screen.session.corridor.segments[row]
        assert after.id == before.id and after.height_end_m == 9.5
        assert drawn(app, row, "exposed").endswith("→9.5")
        await rows_match_fresh_screen(pilot, app)
        assert screen.session.dirty
        await pilot.press("enter", "ctrl+s")
        await pilot.pause()
        assert not screen.session.dirty
    reopened = store.load(corridor_file)
    by_id = {s.id: s for s in reopened.segments}
    assert by_id[before.id].height_end_m == 9.5
    assert corridor_file.with_name(corridor_file.name + ".bak").exists()

    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        rows = [s.id for s in app.corridor_screen.session.corridor.segments]
        assert drawn(app, rows.index(before.id), "exposed").endswith("→9.5")


async def test_invalid_value_is_refused_with_its_reason(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        corridor = screen.session.corridor
        await open_editor_at(pilot, app, 2, 5)
        assert app.focused.id == "field-height_start_m"
        await pilot.press("home", "ctrl+k", *"abc")
        await pilot.pause()
        assert "expected a number" in screen.editor.problems["height_start_m"]
        assert app.focused.has_class("refused")
        assert screen.session.corridor is corridor  # nothing applied
        await pilot.press("home", "ctrl+k", *"-3")
        await pilot.pause()
        assert screen.editor.problems["height_start_m"]  # the store's range check
        assert screen.session.corridor is corridor
        # a valid value clears the reason and is applied
        await pilot.press("home", "ctrl+k", "4")
        await pilot.pause()
        assert "height_start_m" not in screen.editor.problems
        assert screen.session.corridor.segments[2].height_start_m == 4.0


async def test_chainage_end_before_start_is_refused(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        seg = screen.session.corridor.segments[0]
        await open_editor_at(pilot, app, 0, 4)
        assert app.focused.id == "field-chainage_end_m"
        await pilot.press("home", "ctrl+k", *f"{seg.chainage_start_m - 5:g}")
        await pilot.pause()
        assert "greater than" in screen.editor.problems["chainage_end_m"]
        assert screen.session.corridor.segments[0] is seg


async def test_typing_a_value_is_one_undo_step(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        original = screen.session.corridor
        await open_editor_at(pilot, app, 0, 10)
        assert app.focused.id == "field-surcharge_kpa"
        await pilot.press("home", "ctrl+k", *"12.5", "escape")
        await pilot.pause()
        assert screen.session.corridor.segments[0].surcharge_kpa == 12.5
        await pilot.press("u")
        await pilot.pause()
        assert screen.session.corridor is original


async def test_unsaved_changes_guard_on_quit(corridor_file: Path):
    app = make_app(corridor_file)
    n = len(app.session.corridor.segments)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("x")
        await pilot.pause()
        await pilot.press("q")
        await pilot.pause()
        assert isinstance(app.screen, UnsavedScreen)
        await pilot.press("escape")  # stay
        await pilot.pause()
        assert app.screen is app.corridor_screen and app.is_running
        await pilot.press("ctrl+o")
        await pilot.pause()
        assert isinstance(app.screen, UnsavedScreen)  # also before opening another file
        await pilot.press("escape", "q")
        await pilot.pause()
        await pilot.press("d")  # discard
        await pilot.pause()
    assert app.return_code == 0
    assert len(store.load(corridor_file).segments) == n  # discarded: the file is as it was


async def test_quit_without_changes_does_not_ask(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("q")
        await pilot.pause()
    assert app.return_code == 0


async def test_demo_saves_through_save_as_and_is_remembered(tmp_path: Path):
    from screening.tui.config import load_state

    app = make_app(None)
    target = tmp_path / "mine.toml"
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("ctrl+s")
        await pilot.pause()
        assert isinstance(app.screen, PromptScreen)
        await pilot.press("home", "ctrl+k", *str(tmp_path / "nofolder" / "x.toml"), "enter")
        await pilot.pause()
        assert isinstance(app.screen, PromptScreen)  # no such folder: refused
        await pilot.press("home", "ctrl+k", *str(target), "enter")
        await pilot.pause()
        assert app.corridor_screen.session.path == target
    assert len(store.load(target).segments) == len(app.corridor_screen.session.corridor.segments)
    assert load_state().recent[0] == str(target.resolve())


async def test_open_a_bad_file_says_why_and_keeps_the_corridor(tmp_path: Path, corridor_file: Path):
    bad = tmp_path / "bad.toml"
    bad.write_text('schema = "wallscreen/1"\n[corridor\n', encoding="utf-8")
    app = make_app(corridor_file)
    seen: list[str] = []
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        app.notify = lambda message, **kw: seen.append(message)  # type: ignore[method-assign]
        corridor = app.corridor_screen.session.corridor
        await pilot.press("ctrl+o")
        await pilot.pause()
        await pilot.press(*str(bad), "enter")
        await pilot.pause()
        assert app.corridor_screen.session.corridor is corridor
    assert seen and "bad.toml:2" in seen[0]


async def test_detail_view_shows_checks_reasons_layers_and_sketch(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await goto(pilot, app, 1)
        await pilot.press("enter")
        await pilot.pause()
        detail = app.screen
        assert isinstance(detail, DetailScreen)
        res = engine.screen(app.corridor_screen.session.corridor).segment(1)
        checks = plain(detail.query_one("#detail-checks").content)
        for name, check in res.checks.items():
            assert name in checks and cdr_text(check.cdr) in checks
        assert f"▸ {res.governing}" in checks  # the governing check is marked
        assert res.reasons[0] in plain(detail.query_one("#detail-reasons").content)
        layers = plain(detail.query_one("#detail-layers").content)
        assert len([ln for ln in layers.splitlines() if ln.strip()]) == len(res.layers) + 1
        sketch = detail.query_one(CrossSection).render().plain
        assert "█" in sketch and f"L {res.length_m:.1f} m" in sketch
        await pilot.press("right_square_bracket")
        assert detail.row == 2
        await pilot.press("escape")
        assert app.screen is app.corridor_screen


async def test_an_edit_shows_the_built_in_checks_at_once_then_the_full_screen(
    corridor_file: Path,
):
    """Before the slip circles are in, the row carries the built-in checks' numbers (from
    ``engine.screen(..., extra_checks=())``) and no verdict; then the full screen."""
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        change = screen.session.edit_field(4, "height_end_m", "7.25")
        screen.apply(change)  # what the editor does on a valid value; no await: no worker yet
        corridor = screen.session.corridor
        one = dataclasses.replace(corridor, segments=(corridor.segments[4],))
        core = engine.screen(one, extra_checks=())
        assert drawn(app, 4, "length") == f"{core.length_m[0]:.1f}"
        assert drawn(app, 4, "verdict") == "… checking"
        await rows_match_fresh_screen(pilot, app)
