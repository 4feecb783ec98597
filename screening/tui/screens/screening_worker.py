"""Screens off the UI thread: the whole corridor, and the rows an edit made stale.

The engine can take from milliseconds to seconds (slip-circle searches), so nothing is
screened on the UI thread. A whole screen drives ``engine.screen_iter`` chunk by chunk,
shows progress and stops at the next chunk when cancelled. Edited rows are screened in
their own worker, one batch at a time: rows edited while a batch runs wait for the next,
so fast typing never piles up work. Results are handed to ``Session.accept``, which keeps
only what still matches the inputs.
"""

from __future__ import annotations

import time

from textual import work
from textual.worker import get_current_worker

from screening import engine
from screening.engine.result import CorridorResult
from screening.model import Corridor
from screening.model.errors import WallscreenError
from screening.tui.session import screen_rows
from screening.tui.widgets.progress_strip import ProgressStrip


def chunk_size(n: int) -> int:
    """About twenty progress steps, but no chunk under 50 segments: each engine call has a
    fixed cost (the slip-circle search set-up), so many tiny chunks would slow the screen."""
    return max(50, -(-n // 20))


class ScreeningMixin:
    """For :class:`CorridorScreen`: start, follow and cancel screens."""

    screening: bool = False
    """A whole-corridor screen is running."""
    rows_running: bool = False
    """A batch of edited rows is being screened."""
    last_screen_s: float | None = None
    last_edit_ms: float | None = None
    """From the first edit of a batch to its row redrawn with new results, ms."""
    _edit_started: float | None = None

    # ------------------------------------------------------------------ whole corridor

    def start_screen(self) -> None:
        corridor = self.session.corridor
        if not corridor.segments:  # nothing to screen: an empty corridor waits for its first
            return
        self.screening = True
        self.query_one(ProgressStrip).begin(len(corridor.segments))
        self._screen_in_background(corridor)

    @work(thread=True, exclusive=True, group="screen", exit_on_error=False)
    def _screen_in_background(self, corridor: Corridor) -> None:
        worker = get_current_worker()
        started = time.perf_counter()
        steps = engine.screen_iter(corridor, chunk_size=chunk_size(len(corridor.segments)))
        try:
            while True:
                done, total = next(steps)
                if worker.is_cancelled:
                    steps.close()
                    return
                self.app.call_from_thread(self.query_one(ProgressStrip).advance, done, total)
        except StopIteration as stop:
            result = stop.value
        except WallscreenError as err:
            if not worker.is_cancelled:
                self.app.call_from_thread(self._screen_failed, err)
            return
        if not worker.is_cancelled:
            self.last_screen_s = time.perf_counter() - started
            self.app.call_from_thread(self._screen_done, corridor, result)

    def _screen_done(self, corridor: Corridor, result: CorridorResult) -> None:
        self.screening = False
        self.query_one(ProgressStrip).end()
        if not self.session.accept(corridor, range(len(corridor.segments)), result):
            if self.session.result is None:
                self.start_screen()  # the segment list changed meanwhile: screen it
            return
        self.table.update_all_gradually(self.session)
        self.redraw_around()
        self.refresh_editor()
        if self.last_screen_s is not None:
            self.say(f"screened {len(result):,} segments in {self.last_screen_s:.1f} s")
        self.screen_stale_rows()
        self.flush_pending_save()

    def _screen_failed(self, err: WallscreenError) -> None:
        self.screening = False
        self.query_one(ProgressStrip).end()
        self.app.notify(str(err), title=err.title, severity="error", timeout=10)
        self.say(f"screening failed: {err}", "red")

    def cancel_screen(self) -> None:
        self.workers.cancel_group(self, "screen")
        self.screening = False
        self.query_one(ProgressStrip).end()
        self.say("screening cancelled: results are blank; ^r screens again", "yellow")

    # ------------------------------------------------------------------ edited rows

    def screen_stale_rows(self) -> None:
        """Screen the stale rows in the background, unless a batch or a whole screen runs."""
        session = self.session
        if self.screening or self.rows_running or session.result is None or not session.stale:
            return
        if self._edit_started is None:
            self._edit_started = time.perf_counter()
        self.rows_running = True
        self._rows_in_background(session.corridor, sorted(session.stale))

    @work(thread=True, group="rows", exit_on_error=False)
    def _rows_in_background(self, corridor: Corridor, rows: list[int]) -> None:
        try:
            result = screen_rows(corridor, rows)
        except WallscreenError as err:
            self.app.call_from_thread(self._rows_failed, err)
            return
        self.app.call_from_thread(self._rows_done, corridor, rows, result)

    def _rows_done(self, corridor: Corridor, rows: list[int], result: CorridorResult) -> None:
        self.rows_running = False
        if self.session.accept(corridor, rows, result):
            self.table.update_rows(rows, self.session)
            self.redraw_around()
            self.refresh_editor()
            if not self.session.stale and self._edit_started is not None:
                self.last_edit_ms = (time.perf_counter() - self._edit_started) * 1000.0
                self._edit_started = None
        self.screen_stale_rows()
        self.flush_pending_save()

    def _rows_failed(self, err: WallscreenError) -> None:
        self.rows_running = False
        self.app.notify(str(err), title=err.title, severity="error", timeout=10)

    @property
    def results_pending(self) -> bool:
        """Some row has no up-to-date result yet (a save waits for them)."""
        if not self.session.corridor.segments:
            return self.screening
        return (
            self.screening
            or self.rows_running
            or bool(self.session.stale)
            or (self.session.result is None)
        )

    @property
    def busy(self) -> bool:
        """Anything still being screened or drawn (tests and the benchmark wait on this)."""
        return self.results_pending or self.table.updating
