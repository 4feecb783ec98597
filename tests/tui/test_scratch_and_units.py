"""Starting from scratch (an empty corridor, the first segment) and US customary units
everywhere (typed and shown in feet, remembered for the next start), driven by keys.

Unit factors: 1 ft = 0.3048 m and 1 lbf = 4.4482216152605 N exactly [NIST SP 811 (2008),
Appendix B]."""

from __future__ import annotations

from pathlib import Path

import pytest

from screening import store
from screening.cli import main
from screening.model.presets import load_presets
from screening.tui.app import WallscreenApp
from screening.tui.config import load_state
from screening.tui.screens.choose import ChooseScreen
from screening.tui.screens.presets import PresetsScreen, resistance_words
from screening.tui.screens.prompt import PromptScreen
from screening.tui.session import Session

from .conftest import make_app
from .test_workflows import SIZE, drawn, goto, settle

FOOT_M = 0.3048


async def test_an_empty_corridor_opens_says_what_to_do_and_takes_a_first_segment(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
):
    path = tmp_path / "scratch.toml"
    assert main(["new", str(path), "--name", "Brook widening"]) == 0
    out = capsys.readouterr().out
    assert "empty corridor" in out and "water 20 m below the base" in out  # defaults said
    app = make_app(path)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        assert screen.has_class("empty")
        assert "no segments yet" in str(screen.query_one("#empty").content)
        await pilot.press("x", "e", "enter", "b", "s")  # nothing to act on: no crash
        await pilot.pause()
        await pilot.press("a")
        await pilot.pause()
        await settle(pilot, app)
        segs = screen.session.corridor.segments
        assert len(segs) == 1 and segs[0].wall == "Brook widening"
        assert screen.editor.display  # straight into the editor to type its inputs
        assert app.focused.id == "field-id"
        await pilot.press("escape", "ctrl+s")
        await pilot.pause()
        await settle(pilot, app)
    assert [s.id for s in store.load(path).segments] == [segs[0].id]


async def test_new_corridor_key_starts_from_scratch(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("ctrl+n")
        await pilot.pause()
        screen = app.corridor_screen
        assert screen.session.corridor.segments == () and screen.session.path is None
        await pilot.press("a")
        await pilot.pause()
        await settle(pilot, app)
        assert len(screen.session.corridor.segments) == 1


async def test_us_units_in_table_editor_split_and_remembered(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        seg = screen.session.corridor.segments[1]
        await pilot.press("t")
        await pilot.pause()
        assert load_state().units == "us"
        assert drawn(app, 1, "exposed").startswith(f"{seg.height_start_m / FOOT_M:.1f}→")
        await goto(pilot, app, 1)
        await pilot.press("e")
        await pilot.pause()
        for _ in range(6):
            await pilot.press("tab")
        assert app.focused.id == "field-height_end_m"
        assert float(app.focused.value) == pytest.approx(seg.height_end_m / FOOT_M, rel=1e-5)
        assert "ft" in str(screen.query_one("#field-height_end_m-unit").content)
        await pilot.press("home", "ctrl+k", *"20", "escape")  # 20 ft
        await pilot.pause()
        assert screen.session.corridor.segments[1].height_end_m == pytest.approx(6.096, abs=1e-4)
        await settle(pilot, app)
        await pilot.press("s")
        await pilot.pause()
        prompt = app.screen
        assert isinstance(prompt, PromptScreen) and "(ft)" in prompt.label
        at_ft = (seg.chainage_start_m + 10.0) / FOOT_M
        await pilot.press("home", "ctrl+k", *f"{at_ft:.4f}", "enter")
        await pilot.pause()
        first = screen.session.corridor.segments[1]
        assert first.chainage_end_m == pytest.approx(seg.chainage_start_m + 10.0, abs=1e-3)
        await settle(pilot, app)
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        assert app.session.display.system == "us"  # the choice was remembered


async def test_f4_picks_a_preset_in_the_editor(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        await goto(pilot, app, 0)
        await pilot.press("e")
        await pilot.pause()
        for _ in range(8):
            await pilot.press("tab")
        assert app.focused.id == "field-reinforcement"
        await pilot.press("f4")
        await pilot.pause()
        chooser = app.screen
        assert isinstance(chooser, ChooseScreen)
        assert [v for v, _ in chooser.options] == list(load_presets().reinforcement)
        chooser.query_one("#choices").highlighted = [v for v, _ in chooser.options].index(
            "steel-grid"
        )
        await pilot.press("enter")
        await pilot.pause()
        assert screen.session.corridor.segments[0].reinforcement.id == "steel-grid"


async def test_tab_completes_a_path_in_the_open_dialog(tmp_path: Path, corridor_file: Path):
    (tmp_path / "walls-north.toml").write_text(corridor_file.read_text())
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("ctrl+o")
        await pilot.pause()
        await pilot.press(*f"{tmp_path}/walls-n")
        await pilot.pause()
        await pilot.press("tab")
        await pilot.pause()
        assert app.screen.query_one("#prompt-input").value == f"{tmp_path}/walls-north.toml"


async def test_presets_browser_shows_allowable_stress_as_factors_of_safety():
    """FHWA-NHI-00-043 ch. 4 writes FS 1.5 sliding, 2.5 bearing (ASD) [mem]; the file
    keeps 1/FS so that CDR >= 1 passes in every set."""
    presets = load_presets()
    words = resistance_words(presets.factor_sets["asd"])
    assert "sliding FS 1.5" in words and "bearing FS 2.5" in words
    assert "φ" in resistance_words(presets.factor_sets["aashto-lrfd"])
    app = WallscreenApp(Session(store.load(_demo()), None, presets), show_cautions=False)
    async with app.run_test(size=SIZE) as pilot:
        await pilot.press("p")
        await pilot.pause()
        assert isinstance(app.screen, PresetsScreen)


def _demo() -> Path:
    from screening.model.presets import demo_corridor_path

    return Path(str(demo_corridor_path()))
