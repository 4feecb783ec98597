"""Cautions, help, command palette, presets browser, recent files, NO_COLOR, and the
background screen of a large corridor (progress, cancel, a UI that keeps answering)."""

from __future__ import annotations

import threading
from pathlib import Path

import pytest

from screening import engine
from screening.engine.samples import repeated
from screening.model.presets import load_presets
from screening.tui.app import WallscreenApp, open_session
from screening.tui.config import load_state
from screening.tui.keys import ACTIONS, shown_key
from screening.tui.screens.about import CAUTIONS, AboutScreen
from screening.tui.screens.choose import ChooseScreen
from screening.tui.screens.help import HelpScreen
from screening.tui.screens.presets import PresetsScreen
from screening.tui.session import Session
from screening.tui.widgets.progress_strip import ProgressStrip

from .conftest import make_app
from .test_workflows import SIZE, drawn, plain, settle

CAUTION_WORDS = ("not a design", "licensed engineer", "governing local code")


def replicated(n: int):
    """The demo corridor repeated along the chainage to ``n`` segments (new ids)."""
    return repeated(open_session(None).corridor, n)


async def test_cautions_on_first_start_only(corridor_file: Path):
    app = make_app(corridor_file, show_cautions=None)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        assert isinstance(app.screen, AboutScreen)
        text = plain(app.screen.query_one("#about Static:last-of-type").content)
        for words in CAUTION_WORDS:
            assert words in text.replace("\n", " ")
        await pilot.press("enter")
        assert app.screen is app.corridor_screen
    assert load_state().cautions_seen
    app = make_app(corridor_file, show_cautions=None)
    async with app.run_test(size=SIZE):
        assert app.screen is app.corridor_screen  # not again
        line = app.corridor_screen.query_one("#caution").content.plain
        for words in CAUTION_WORDS:
            assert words in line  # but the one-line caution is always there


async def test_about_screen_repeats_the_cautions(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("i")
        assert isinstance(app.screen, AboutScreen)
        text = plain(app.screen.query_one("#about Static:last-of-type").content)
        assert CAUTIONS[0] in text.replace("\n", " ")


async def test_help_lists_every_key(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("question_mark")
        assert isinstance(app.screen, HelpScreen)
        from screening.tui.screens.help import keys_table

        text = plain(keys_table())
        for action in ACTIONS:
            assert action.title in text and shown_key(action.keys) in text


async def test_every_action_is_bound_and_in_the_palette(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        bound = {b.action for b in screen.BINDINGS}
        titles = [c.title for c in app.get_system_commands(screen)]
        for action in ACTIONS:
            assert action.action in bound
            assert hasattr(screen, f"action_{action.action}"), action.action
            assert any(t.startswith(action.title) for t in titles), action.title


async def test_palette_command_runs_the_action(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        n = len(app.corridor_screen.session.corridor.segments)
        command = next(c for c in app.get_system_commands(app.screen) if c.title.startswith("Copy"))
        await command.callback()
        await pilot.pause()
        assert len(app.corridor_screen.session.corridor.segments) == n + 1


async def test_presets_browser_shows_values_and_sources(corridor_file: Path):
    presets = load_presets()
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("p")
        await pilot.pause()
        browser = app.screen
        assert isinstance(browser, PresetsScreen)
        listing = browser.query_one("#presets-list")
        target = next(iter(presets.factor_sets))
        listing.highlighted = listing.get_option_index(f"factor_sets:{target}")
        await pilot.pause()
        text = plain(browser.query_one("#presets-view").content)
        assert presets.factor_sets[target].source.split()[0] in text
        assert "Resistance" in text  # in words: "sliding φ 1", or FS under allowable stress
        fill_id, fill = next(iter(presets.fills.items()))
        listing.highlighted = listing.get_option_index(f"fills:{fill_id}")
        await pilot.pause()
        text = plain(browser.query_one("#presets-view").content)
        assert f"{fill.friction_deg:.4g}" in text


async def test_recent_files_reopen(tmp_path: Path, corridor_file: Path):
    other = tmp_path / "other.toml"
    other.write_bytes(corridor_file.read_bytes())
    async with make_app(other).run_test(size=SIZE):
        pass  # opening it puts it on the list
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("r")
        await pilot.pause()
        chooser = app.screen
        assert isinstance(chooser, ChooseScreen)
        values = [v for v, _ in chooser.options]
        assert values[:2] == [str(corridor_file.resolve()), str(other.resolve())]
        chooser.query_one("#choices").highlighted = 1
        await pilot.press("enter")
        await pilot.pause()
        assert app.corridor_screen.session.path == Path(str(other.resolve()))


async def test_no_color_keeps_verdicts_readable(
    corridor_file: Path, monkeypatch: pytest.MonkeyPatch
):
    monkeypatch.setenv("NO_COLOR", "1")
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        assert app.no_color
        result = app.corridor_screen.session.result
        for i, verdict in enumerate(result.verdict):
            assert drawn(app, i, "verdict").endswith(verdict)  # the word, not only a colour


async def test_large_corridor_screens_in_background(monkeypatch: pytest.MonkeyPatch):
    """The worker shows progress, the table keeps moving, Esc cancels, ^r restarts."""
    gate = threading.Event()
    real = engine.screen_iter

    def held_back(corridor, chunk_size=500):
        steps = real(corridor, chunk_size)
        yield next(steps)
        gate.wait(30)  # hold the real screen after its first chunk until the test lets go
        return (yield from steps)

    monkeypatch.setattr(engine, "screen_iter", held_back)
    corridor = replicated(600)
    app = WallscreenApp(Session(corridor, None, load_presets()), show_cautions=False)
    async with app.run_test(size=SIZE) as pilot:
        screen = app.corridor_screen
        strip = screen.query_one(ProgressStrip)
        assert screen.screening and strip.has_class("running")
        start = screen.table.cursor_row
        await pilot.press("down", "down", "down")
        assert screen.table.cursor_row == start + 3  # the interface answers while it runs
        await pilot.press("escape")
        assert not screen.screening and not strip.has_class("running")
        assert screen.session.result is None
        assert drawn(app, 0, "verdict") == "…"
        await pilot.press("ctrl+r")
        assert screen.screening
        gate.set()
        await settle(pilot, app)
        assert not screen.screening and not strip.has_class("running")
        fresh = engine.screen(screen.session.corridor)
        for i in (0, 299, 599):
            assert drawn(app, i, "verdict").endswith(fresh.verdict[i])
            assert drawn(app, i, "length") == f"{fresh.length_m[i]:.1f}"
