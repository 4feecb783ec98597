"""Whole-corridor screens: at once for small corridors, in a thread worker for large ones.

The worker drives ``engine.screen_iter`` chunk by chunk, reports progress to the strip and
stops at the next chunk when cancelled; the interface keeps answering keys throughout.
A result is only taken if the inputs did not change while it ran.
"""

from __future__ import annotations

import time

from textual import work
from textual.worker import get_current_worker

from screening import engine
from screening.engine.result import CorridorResult
from screening.errors import WallscreenError
from screening.model import Corridor
from screening.tui.widgets.progress_strip import ProgressStrip

IN_PLACE_LIMIT = 400
"""Up to this many segments, a full screen runs on the UI thread (a few tens of ms)."""
CHUNK = 250


class ScreeningMixin:
    """For :class:`CorridorScreen`: start, follow and cancel whole-corridor screens."""

    screening: bool = False
    last_screen_s: float | None = None

    def start_screen(self) -> None:
        corridor = self.session.corridor
        n = len(corridor.segments)
        if n <= IN_PLACE_LIMIT:
            started = time.perf_counter()
            try:
                result = engine.screen(corridor)
            except WallscreenError as err:
                self._screen_failed(err)
                return
            self.last_screen_s = time.perf_counter() - started
            self._screen_done(corridor, result)
            return
        self.screening = True
        self.query_one(ProgressStrip).begin(n)
        self._screen_in_background(corridor)

    @work(thread=True, exclusive=True, group="screen", exit_on_error=False)
    def _screen_in_background(self, corridor: Corridor) -> None:
        worker = get_current_worker()
        started = time.perf_counter()
        steps = engine.screen_iter(corridor, chunk_size=CHUNK)
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
            self.app.call_from_thread(self._screen_failed, err)
            return
        if not worker.is_cancelled:
            self.last_screen_s = time.perf_counter() - started
            self.app.call_from_thread(self._screen_done, corridor, result)

    def _screen_done(self, corridor: Corridor, result: CorridorResult) -> None:
        self.screening = False
        self.query_one(ProgressStrip).end()
        if not self.session.accept_result(corridor, result):
            self.start_screen()  # the inputs moved on meanwhile: screen them
            return
        self.table.update_rows(range(len(result)), corridor, result)
        self.redraw_around()
        if self.last_screen_s is not None and len(result) > IN_PLACE_LIMIT:
            self.say(f"screened {len(result):,} segments in {self.last_screen_s:.1f} s")

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
