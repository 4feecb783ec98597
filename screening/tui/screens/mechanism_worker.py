"""The mechanism check in the background, after each screen, on the segments that need it.

The mechanism check (limit analysis, an upper bound: unsafe side) takes a second or more
per segment, so it runs in a thread worker that drives worker processes
(``engine.mechanism.check.run_mechanism``), after every whole screen and every batch of
re-screened rows, on the referred and marginal segments whose answer is not already known
for their present inputs. Progress shows in the status line; Esc, a new screen or an edit
stops it; typing never waits for it. Answers are kept per session (``store_for``) against
the inputs and the screen they were made for, so an edited segment is never shown an old
mechanism. ``WALLSCREEN_MECHANISM=off`` in the environment turns the automatic run off
(scripts and tests of other parts of the interface).
"""

from __future__ import annotations

import os
import weakref
from dataclasses import dataclass, field

from textual import work
from textual.worker import get_current_worker

from screening.engine.mechanism import check
from screening.engine.mechanism.flags import UPPER_BOUND_WORDS
from screening.model.errors import WallscreenError

NODES = check.NODES
WORKERS: int | None = None
"""Worker processes (None: the engine's default, 2 on this kind of machine)."""


@dataclass
class MechanismStore:
    """The mechanism answers of one session, by segment id, with what they were made for."""

    answers: dict[str, tuple[object, float, check.SegmentMechanism]] = field(default_factory=dict)
    running: bool = False
    done: int = 0
    total: int = 0

    def answer(self, session, row: int) -> check.SegmentMechanism | None:
        """The answer for ``row`` if it was made for the row's present inputs and screen."""
        if session.result is None or row in session.stale or row >= len(session.corridor.segments):
            return None
        seg = session.corridor.segments[row]
        kept = self.answers.get(seg.id)
        if kept is None or kept[0] != seg or abs(kept[1] - session.result.length_m[row]) > 1e-9:
            return None
        return kept[2]


_STORES: weakref.WeakKeyDictionary = weakref.WeakKeyDictionary()


def store_for(session) -> MechanismStore:
    if session not in _STORES:
        _STORES[session] = MechanismStore()
    return _STORES[session]


def result_with_mechanism(session):
    """``session.result`` with the mechanism answers that still hold in its extras (for a
    save: ``store.save(path, session.corridor, result_with_mechanism(session))`` writes them
    into ``[segment.result]``); the result itself when there are none."""
    result = session.result
    if result is None:
        return None
    store = store_for(session)
    rows = [store.answer(session, i) for i in range(len(result))]
    if not any(rows):
        return result
    mech = check.MechanismResults(list(result.ids), rows, 0.0)
    return check.with_mechanism(result, mech)


def automatic() -> bool:
    return os.environ.get("WALLSCREEN_MECHANISM", "on").strip().lower() not in ("off", "0", "no")


class MechanismMixin:
    """For :class:`CorridorScreen`, before ``ScreeningMixin`` in its bases: the mechanism
    check starts when a whole screen or a batch of rows has landed."""

    def _screen_done(self, corridor, result) -> None:
        super()._screen_done(corridor, result)
        self.start_mechanism()

    def _rows_done(self, corridor, rows, result) -> None:
        super()._rows_done(corridor, rows, result)
        self.start_mechanism()

    @property
    def mechanism_running(self) -> bool:
        return store_for(self.session).running

    def start_mechanism(self, force: bool = False) -> None:
        """Run the check on the rows that need it and have no answer yet."""
        s = self.session
        if not (force or automatic()) or s.result is None or s.stale or self.screening:
            return
        store = store_for(s)
        rows = [
            int(i) for i in check.needs_mechanism(s.result).tolist() if store.answer(s, i) is None
        ]
        if not rows:
            return
        store.running, store.done, store.total = True, 0, len(rows)
        self._mechanism_in_background(s, s.corridor, s.result, rows)

    @work(thread=True, exclusive=True, group="mechanism", exit_on_error=False)
    def _mechanism_in_background(self, session, corridor, result, rows: list[int]) -> None:
        worker = get_current_worker()

        def progress(done: int, total: int) -> None:
            if not worker.is_cancelled:
                self.app.call_from_thread(self._mechanism_progress, session, done, total)

        try:
            mech = check.run_mechanism(
                corridor,
                result,
                rows=rows,
                workers=WORKERS,
                nodes=NODES,
                progress=progress,
                cancel=lambda: worker.is_cancelled,
            )
        except WallscreenError as err:
            if not worker.is_cancelled:
                self.app.call_from_thread(self._mechanism_failed, session, err)
            return
        if not worker.is_cancelled and not mech.cancelled:
            self.app.call_from_thread(self._mechanism_done, session, corridor, result, mech)

    def _mechanism_progress(self, session, done: int, total: int) -> None:
        store = store_for(session)
        store.done, store.total = done, total
        self.say(
            f"mechanism check ({UPPER_BOUND_WORDS}): {done}/{total} segments · Esc stops it",
            "dim",
        )

    def _mechanism_done(self, session, corridor, result, mech) -> None:
        store = store_for(session)
        store.running = False
        for answer in mech.segments:
            if answer is not None:
                seg = corridor.segments[answer.row]
                store.answers[seg.id] = (seg, float(result.length_m[answer.row]), answer)
        flagged = len(mech.flagged())
        ran = sum(1 for a in mech.segments if a is not None)
        self.say(
            f"mechanism check ({UPPER_BOUND_WORDS}): {ran} segments in {mech.seconds:.0f} s, "
            f"{flagged} flagged (a cross-check: verdicts unchanged; Enter shows the detail)"
        )
        self._mechanism_redraw()

    def _mechanism_failed(self, session, err: WallscreenError) -> None:
        store_for(session).running = False
        self.say(f"mechanism check stopped: {err}", "yellow")
        self._mechanism_redraw()

    def cancel_mechanism(self) -> None:
        self.workers.cancel_group(self, "mechanism")
        store_for(self.session).running = False
        self.say("mechanism check stopped; it runs again after the next screen", "yellow")
        self._mechanism_redraw()

    def _mechanism_redraw(self) -> None:
        for view in self.app.screen.query("MechanismView"):  # by name: no import circle
            view.refresh()
