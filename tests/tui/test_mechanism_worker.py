"""The mechanism check in the interface: a background worker after each screen (progress in
the status line, Esc stops it, typing never waits) and its answer in the detail view, which
always says it is an upper bound (unsafe side). Numbers are checked against the engine's own
``run_mechanism`` on the same inputs (the mechanism factor's published checks are in
tests/validation/test_mechanism_published.py)."""

from __future__ import annotations

import dataclasses
from pathlib import Path

import numpy as np
import pytest

from screening import engine, store
from screening.engine.mechanism import check
from screening.model.presets import demo_corridor_path
from screening.tui.screens import mechanism_worker
from screening.tui.screens.detail import DetailScreen
from screening.tui.screens.mechanism_worker import MechanismMixin, store_for
from screening.tui.widgets.mechanism_view import MechanismView

from .conftest import make_app
from .test_workflows import settle

SIZE = (160, 50)
IDS = ("WL-01", "WL-02", "WR-01", "R-06")
"""Two marginal, one clear and one referred segment of the demo corridor."""


@pytest.fixture
def small_file(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    monkeypatch.setenv("WALLSCREEN_MECHANISM", "on")
    monkeypatch.setattr(mechanism_worker, "NODES", 90)
    monkeypatch.setattr(mechanism_worker, "WORKERS", 1)
    demo = store.load(demo_corridor_path())
    small = dataclasses.replace(demo, segments=tuple(s for s in demo.segments if s.id in IDS))
    path = tmp_path / "small.toml"
    store.save(path, small)
    return path


async def _mechanism_landed(pilot, app) -> None:
    for _ in range(600):
        await app.workers.wait_for_complete()
        await pilot.pause()
        screen = app.corridor_screen
        if not screen.mechanism_running and store_for(screen.session).answers:
            return
    raise AssertionError("the mechanism check did not finish")


def status(app) -> str:
    return str(app.corridor_screen.query_one("#status").content)


async def test_runs_after_the_screen_with_progress_and_shows_in_detail(small_file, monkeypatch):
    """After the screen the worker runs on the referred and marginal rows only, reports
    progress in the status line, keeps the engine's own answers (run_mechanism on the same
    inputs) and the detail view shows the factor with 'upper bound (unsafe side)'."""
    seen: list[tuple[int, int]] = []
    original = MechanismMixin._mechanism_progress

    def spy(self, session, done, total):
        seen.append((done, total))
        original(self, session, done, total)

    monkeypatch.setattr(MechanismMixin, "_mechanism_progress", spy)
    app = make_app(small_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await _mechanism_landed(pilot, app)
        session = app.corridor_screen.session
        flagged_rows = check.needs_mechanism(session.result).tolist()
        assert len(flagged_rows) == 3
        assert seen[-1] == (3, 3) and len(seen) == 3
        assert "mechanism check (upper bound (unsafe side))" in status(app)
        kept = store_for(session)
        assert set(kept.answers) == {session.corridor.segments[i].id for i in flagged_rows}
        fresh = check.run_mechanism(
            session.corridor, engine.screen(session.corridor), workers=1, nodes=90
        )
        for i in flagged_rows:
            assert kept.answer(session, i).factor == pytest.approx(fresh.factor[i], rel=1e-9)
        clear_row = next(i for i in range(len(session.result)) if i not in flagged_rows)
        assert kept.answer(session, clear_row) is None
        saved = store.dumps(session.corridor, mechanism_worker.result_with_mechanism(session))
        assert saved.count("mechanism_factor = ") == 3

        row = flagged_rows[0]
        app.corridor_screen.table.move_to(app.corridor_screen.session, row)
        await pilot.press("enter")
        await pilot.pause()
        assert isinstance(app.screen, DetailScreen)
        view = app.screen.query_one(MechanismView)
        words = view.words().plain
        assert "upper bound (unsafe side)" in words
        assert f"F = {fresh.factor[row]:.3f}" in words
        drawn = app.export_screenshot().replace("&#160;", " ")
        assert "upper bound (unsafe side)" in drawn
        assert any(0x2801 <= ord(ch) <= 0x28FF for ch in view.render().plain)


async def test_escape_stops_it_and_typing_goes_on(small_file, monkeypatch):
    """Esc stops the worker between segments: fewer answers than rows, nothing running, the
    status line says so; the table still takes keys while it runs."""
    monkeypatch.setattr(mechanism_worker, "NODES", 600)  # slow enough to stop half-way
    app = make_app(small_file)
    async with app.run_test(size=SIZE) as pilot:
        screen = app.corridor_screen
        for _ in range(600):  # not workers.wait_for_complete: that waits for this one too
            await pilot.pause(0.05)
            if screen.mechanism_running:
                break
        assert screen.mechanism_running
        before = screen.table.cursor_row
        await pilot.press("down")
        assert screen.table.cursor_row == before + 1
        assert screen.mechanism_running
        await pilot.press("escape")
        await app.workers.wait_for_complete()
        await pilot.pause()
        assert not screen.mechanism_running
        assert len(store_for(screen.session).answers) < 3
        assert "mechanism check stopped" in status(app)


async def test_an_edited_segment_never_shows_its_old_mechanism(small_file):
    """An answer belongs to the inputs and L it was made for: after an edit of the row it is
    not shown until the check runs again on the new inputs."""
    app = make_app(small_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await _mechanism_landed(pilot, app)
        session = app.corridor_screen.session
        row = int(check.needs_mechanism(session.result)[0])
        kept = store_for(session)
        old = kept.answer(session, row)
        assert old is not None
        seg = session.corridor.segments[row]
        session.edit_field(row, "height_end_m", f"{seg.height_end_m + 0.5:g}")
        assert kept.answer(session, row) is None
        assert np.isfinite(old.factor)
