"""Corridor tools in the terminal interface, driven by keys: display units, quantities,
report export, comparing with another file, and sensitivity in the detail view.

Each check compares what the interface shows or writes with an independent computation:
a fresh ``engine.screen`` of the same inputs fed to the headless tools
(``corridor_quantities``, ``segment_sensitivity``, ``diff_corridors``), and for units the
definition of the foot, 0.3048 m exactly [pub, NIST Special Publication 811 (2008),
Appendix B.8].
"""

from __future__ import annotations

import dataclasses
from pathlib import Path

from textual.widgets import Checkbox, DataTable, Input, Static

from screening import engine, store
from screening.corridor.quantities import corridor_quantities
from screening.corridor.sensitivity import segment_sensitivity
from screening.report import CAUTION
from screening.tui.screens.compare import CompareScreen
from screening.tui.screens.detail import DetailScreen
from screening.tui.screens.export import ExportScreen
from screening.tui.screens.prompt import PromptScreen
from screening.tui.screens.quantities import QuantitiesScreen

from .conftest import make_app
from .test_workflows import SIZE, drawn, goto, plain, settle, summary

FOOT_M = 0.3048  # exact, by definition [pub, NIST SP 811 (2008), B.8]


async def finish_workers(pilot, app) -> None:
    await app.workers.wait_for_complete()
    await pilot.pause()


def static_text(screen, selector: str) -> str:
    return plain(screen.query_one(selector, Static).content)


async def test_units_toggle_shows_feet_in_table_summary_and_detail(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        screen = app.corridor_screen
        seg = screen.session.corridor.segments[1]
        assert drawn(app, 1, "chainage") == f"{seg.chainage_start_m:.1f}–{seg.chainage_end_m:.1f}"
        await pilot.press("t")
        table = screen.query_one(DataTable)
        assert table.columns["chainage"].label.plain == "Chainage ft"
        assert table.columns["length"].label.plain == "L ft"
        start_ft, end_ft = seg.chainage_start_m / FOOT_M, seg.chainage_end_m / FOOT_M
        assert drawn(app, 1, "chainage") == f"{start_ft:.1f}–{end_ft:.1f}"
        fresh = engine.screen(screen.session.corridor)
        assert drawn(app, 1, "length") == f"{fresh.length_m[1] / FOOT_M:.1f}"
        length_ft = sum(s.length_along_m for s in screen.session.corridor.segments) / FOOT_M
        assert f"wall {length_ft:,.0f} ft" in summary(app)
        await goto(pilot, app, 1)
        await pilot.press("enter")
        await pilot.pause()
        detail = app.screen
        assert isinstance(detail, DetailScreen)
        assert f"L {fresh.length_m[1] / FOOT_M:.1f} ft" in static_text(detail, "#detail-facts")
        await pilot.press("t")  # back to SI from the detail view; the table follows
        assert f"L {fresh.length_m[1]:.1f} m" in static_text(detail, "#detail-facts")
        await pilot.press("escape")
        await pilot.pause()
        assert table.columns["chainage"].label.plain == "Chainage m"
        assert drawn(app, 1, "chainage") == f"{seg.chainage_start_m:.1f}–{seg.chainage_end_m:.1f}"
        assert store.load(corridor_file) == store.load(corridor_file)  # nothing saved
        assert not screen.session.dirty


async def test_quantities_screen_totals_match_the_headless_quantities(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        corridor = app.corridor_screen.session.corridor
        expected = corridor_quantities(corridor, engine.screen(corridor))
        await pilot.press("m")
        await pilot.pause()
        screen = app.screen
        assert isinstance(screen, QuantitiesScreen)
        totals = static_text(screen, "#quantities-totals")
        assert f"{expected.total('cost_total'):,.0f}" in totals
        assert f"{expected.total('face_area_m2'):,.0f} m²" in totals  # one number format
        assert f"{expected.total('select_fill_m3'):,.0f} m³" in totals
        assert "PLACEHOLDER" in static_text(screen, "#quantities-note")
        rows = screen.query_one(DataTable)
        assert rows.row_count == len(corridor.segments)
        for i, q in enumerate(expected.segments):
            cells = rows.get_row_at(i)
            assert cells[0].plain == q.id and cells[-1].plain == f"{q.cost_total:,.0f}"
        await pilot.press("escape")
        await pilot.pause()
        assert app.screen is app.corridor_screen


async def test_export_writes_every_segment_and_the_cautions(corridor_file: Path, tmp_path: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        ids = [s.id for s in app.corridor_screen.session.corridor.segments]
        for name, units, sensitivity in (("report.csv", "si", True), ("report.md", "us", False)):
            if units == "us":
                await pilot.press("t")
            out = tmp_path / name
            await pilot.press("E")
            await pilot.pause()
            dialog = app.screen
            assert isinstance(dialog, ExportScreen)
            box = dialog.query_one("#export-path", Input)
            box.value = str(tmp_path / "no-such-folder" / name)
            await pilot.press("enter")  # refused: the folder does not exist
            assert app.screen is dialog and not out.exists()
            box.value = str(out)
            dialog.query_one(Checkbox).value = sensitivity
            await pilot.press("enter")
            await finish_workers(pilot, app)
            text = out.read_text(encoding="utf-8")
            assert all(i in text for i in ids), name
            assert CAUTION in text
            assert f"report written to {out}" in static_text(app.corridor_screen, "#status")
        assert "chainage (ft)" in text  # the US units chosen on screen


async def test_compare_lists_the_change_made_in_the_other_file(corridor_file: Path, tmp_path: Path):
    other = store.load(corridor_file)
    row = 4
    seg = other.segments[row]
    changed = dataclasses.replace(seg, height_end_m=seg.height_end_m + 1.5)
    older = dataclasses.replace(
        other, segments=other.segments[:row] + (changed,) + other.segments[row + 1 :]
    )
    older_path = tmp_path / "older.toml"
    store.save(older_path, older)
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        await pilot.press("d")
        await pilot.pause()
        prompt = app.screen
        assert isinstance(prompt, PromptScreen)
        prompt.query_one(Input).value = str(older_path)
        await pilot.press("enter")
        await finish_workers(pilot, app)
        screen = app.screen
        assert isinstance(screen, CompareScreen)
        # exactly the change made: one segment, one input, older file -> open corridor
        assert [d.id for d in screen.diff] == [seg.id]
        (change,) = screen.diff[0].inputs
        assert (change.path, change.old, change.new) == (
            "height_end_m",
            changed.height_end_m,
            seg.height_end_m,
        )
        text = static_text(screen, "#compare-view")
        assert seg.id in text
        assert f"height_end_m {changed.height_end_m:.4g} m → {seg.height_end_m:.4g} m" in text
        assert "1 of" in text and "segments changed" in text


async def test_detail_shows_quantities_and_ranks_inputs_on_demand(corridor_file: Path):
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE) as pilot:
        await settle(pilot, app)
        corridor = app.corridor_screen.session.corridor
        fresh = engine.screen(corridor)
        row = 2
        await goto(pilot, app, row)
        await pilot.press("v")  # from the table: opens the detail and ranks
        await pilot.pause()
        detail = app.screen
        assert isinstance(detail, DetailScreen) and detail.row == row
        expected_q = corridor_quantities(corridor, fresh).segments[row]
        assert f"{expected_q.cost_total:,.0f}" in static_text(detail, "#detail-quantities")
        await finish_workers(pilot, app)
        await pilot.pause()
        shown = static_text(detail, "#detail-sensitivity")
        ranking = segment_sensitivity(corridor, row, result=fresh)
        lines = [ln for ln in shown.splitlines() if ln.strip()[:2] in ("1 ", "2 ")]
        assert ranking[0].label in lines[0] and ranking[1].label in lines[1]
        flips = [s.label for s in ranking if s.flips]
        assert ("flips within the range of" in shown) == bool(flips)


async def test_compare_with_a_broken_file_says_why_and_stays(corridor_file: Path, tmp_path: Path):
    broken = tmp_path / "broken.toml"
    broken.write_text('name = "x"\n[[segment]\nid = 1\n', encoding="utf-8")
    app = make_app(corridor_file)
    async with app.run_test(size=SIZE, notifications=True) as pilot:
        await settle(pilot, app)
        await pilot.press("d")
        await pilot.pause()
        app.screen.query_one(Input).value = str(broken)
        await pilot.press("enter")
        await finish_workers(pilot, app)
        assert app.screen is app.corridor_screen
        messages = [n.message for n in app._notifications]
        assert any("broken.toml:2:" in m for m in messages), messages  # file:line:column
        assert "could not compare" in static_text(app.corridor_screen, "#status")
