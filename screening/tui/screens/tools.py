"""Corridor tools on the corridor screen: quantities, sensitivity, report export,
comparing with another file, and the display units (SI / US customary).

Anything that runs the engine or writes a file (a report, a comparison's screen of the
other file) runs in a thread worker; the result comes back as a notification or a screen.
"""

from __future__ import annotations

import time
from pathlib import Path

from textual import work
from textual.worker import get_current_worker

from screening.corridor.diff import CorridorDiff
from screening.corridor.quantities import corridor_quantities, rates_words
from screening.model.errors import WallscreenError
from screening.model.units import Display
from screening.report import write_report
from screening.tui.config import remember_units
from screening.tui.corridor_tools import (
    check_corridor_path,
    compare_with,
    default_report_path,
    rates_for,
)
from screening.tui.screens.prompt import PromptScreen


def _problem(err: Exception) -> str:
    return str(err) if isinstance(err, WallscreenError) else f"{type(err).__name__}: {err}"


class ToolsMixin:
    """For :class:`CorridorScreen`."""

    exporting: bool = False
    comparing: bool = False

    def _ready(self, what: str) -> bool:
        """True when every row has an up-to-date screen; otherwise say why ``what`` waits."""
        if self.busy:
            self.say(f"{what} once the screen in progress lands", "yellow")
            return False
        return True

    # ------------------------------------------------------------------ units

    def action_toggle_units(self) -> None:
        s = self.session
        s.display = Display("us" if s.display.system == "si" else "si")
        remember_units(s.display.system)
        self.show_units()
        self.say(
            "showing US customary units (ft, psf, pcf, kip/ft); the file stays in SI"
            if s.display.system == "us"
            else "showing SI units"
        )

    def show_units(self) -> None:
        """Redraw the table headings, every row, the summary and the editor in the
        session's units."""
        table = self.table
        table.relabel(self.session)
        table.update_all_gradually(self.session)  # visible rows first: no freeze at 5,000
        self.redraw_around()
        if self.editor.display and self.session.corridor.segments:
            self.editor.load(self.session.corridor.segments[self.cursor], self.session.display)
            self.editor.show_outcome(self.session, self.cursor)

    # ------------------------------------------------------------------ quantities

    def action_quantities(self) -> None:
        if not self._ready("quantities"):
            return
        from screening.tui.screens.quantities import QuantitiesScreen

        s = self.session
        try:
            q = corridor_quantities(s.corridor, s.result, rates_for(s.corridor, s.rates_override))
        except WallscreenError as err:
            self.app.notify(str(err), title="No quantities", severity="error", timeout=10)
            return
        where = rates_words(s.corridor, s.rates_path)
        self.app.push_screen(QuantitiesScreen(s.corridor.name, q, s.display, self.cursor, where))

    # ------------------------------------------------------------------ sensitivity

    def action_sensitivity(self) -> None:
        """Open the selected segment's detail and rank its inputs there."""
        if self._lookup(self.cursor) is None:
            self.say("this segment is being screened: sensitivity once it is done", "yellow")
            return
        self.action_open_detail()
        detail = self.app.screen
        if hasattr(detail, "action_sensitivity"):
            self.app.call_after_refresh(detail.action_sensitivity)

    # ------------------------------------------------------------------ report

    def action_export_report(self) -> None:
        if self.exporting:
            self.say("a report is being written: wait for it to finish", "yellow")
            return
        if not self._ready("export"):
            return
        from screening.tui.screens.export import ExportChoice, ExportScreen

        s = self.session
        flagged = sum(1 for v in s.result.verdict if v != "clear")

        def chosen(choice: ExportChoice | None) -> None:
            if choice is None:
                return
            if self.busy:  # edited meanwhile
                self.say("export once the screen in progress lands", "yellow")
                return
            self.exporting = True
            self.say(f"writing report {choice.path}…")
            self._export(s.corridor, s.result, choice.path, s.display.system, choice.sensitivity)

        self.app.push_screen(
            ExportScreen(default_report_path(s.path), s.display.system, flagged), chosen
        )

    @work(thread=True, exclusive=True, group="export", exit_on_error=False)
    def _export(self, corridor, result, path: Path, units: str, sensitivity: bool) -> None:
        started = time.perf_counter()
        try:
            s = self.session
            out = write_report(
                corridor,
                result,
                path,
                units=units,
                sensitivity=sensitivity,
                rates=rates_for(corridor, s.rates_override),
                source=s.path if not s.dirty else None,
                rates_source=rates_words(corridor, s.rates_path),
            )
        except Exception as err:  # shown, never a traceback; the user's files are untouched
            self.app.call_from_thread(self._export_failed, _problem(err))
            return
        took = time.perf_counter() - started
        self.app.call_from_thread(self._exported, out, took)

    def _exported(self, path: Path, took_s: float) -> None:
        self.exporting = False
        self.say(f"report written to {path} ({took_s:.1f} s)")
        self.app.notify(f"Report written to {path}", title="Report", timeout=8)

    def _export_failed(self, message: str) -> None:
        self.exporting = False
        self.say("the report was not written", "red")
        self.app.notify(message, title="Report not written", severity="error", timeout=12)

    # ------------------------------------------------------------------ compare

    def action_compare_file(self) -> None:
        if self.comparing:
            self.say("a comparison is running: wait for it to finish", "yellow")
            return
        if not self._ready("compare"):
            return

        def chosen(raw: str | None) -> None:
            if raw is None:
                return
            if self.busy:
                self.say("compare once the screen in progress lands", "yellow")
                return
            path = check_corridor_path(raw)
            s = self.session
            self.comparing = True
            self.say(f"screening {path.name} to compare…")
            self._compare(path, s.corridor, s.result)

        current = str(self.session.path) if self.session.path else ""
        self.app.push_screen(
            PromptScreen(
                "Compare with another corridor file",
                "Path of the other version (.toml); it is screened afresh, then compared "
                "with what is open now (unsaved edits included):",
                current,
                check_corridor_path,
                paths=(".toml",),
            ),
            chosen,
        )

    @work(thread=True, exclusive=True, group="compare", exit_on_error=False)
    def _compare(self, path: Path, corridor, result) -> None:
        worker = get_current_worker()
        try:
            diff = compare_with(path, corridor, result, self.session.presets)
        except Exception as err:
            self.app.call_from_thread(self._compare_failed, path, _problem(err))
            return
        if not worker.is_cancelled:
            self.app.call_from_thread(self._compared, path, diff)

    def _compared(self, path: Path, diff: CorridorDiff) -> None:
        from screening.tui.screens.compare import CompareScreen

        self.comparing = False
        this = self.session.path.name if self.session.path else "demo corridor (unsaved copy)"
        if self.session.dirty:
            this += " (with unsaved edits)"
        self.say(f"compared with {path}: {len(diff)} segment(s) differ")
        self.app.push_screen(CompareScreen(path.name, this, diff, self.session.display))

    def _compare_failed(self, path: Path, message: str) -> None:
        self.comparing = False
        self.say(f"could not compare with {path.name}", "red")
        self.app.notify(message, title="Compare", severity="error", timeout=12)
