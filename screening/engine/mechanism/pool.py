"""A small process pool for the mechanism check: quiet, cancellable, and loud when it fails.

Worker processes start by ``spawn`` (a fork of a process with threads, such as the terminal
interface, can deadlock), write nothing to the terminal (Python's stdout and stderr are
closed in them, and HiGHS runs silent, ``lp._new_highs``, so nothing reaches the command
line's JSON or the interface's screen) and hand answers and errors back through a queue. A worker that dies is an error at once, never a pool that
keeps starting new ones; cancelling stops the workers where they are.
"""

from __future__ import annotations

import multiprocessing
import queue
import sys
from collections.abc import Callable, Sequence

from screening.model.errors import EngineError

WAIT_S = 0.2
"""How often the parent looks at ``cancel`` and at its workers while it waits."""


def quiet() -> None:
    """Python code in this process prints nothing from now on (print() to None is a no-op);
    the solver's own output is off in ``lp._new_highs``."""
    sys.stdout = None
    sys.stderr = None


def _worker(fn, tasks, answers) -> None:
    quiet()
    while True:
        item = tasks.get()
        if item is None:
            return
        k, job = item
        try:
            answers.put((k, True, fn(job)))
        except Exception as err:  # reported by the parent as an EngineError
            answers.put((k, False, f"{type(err).__name__}: {err}"))


def run_in_processes(
    fn: Callable,
    jobs: Sequence,
    workers: int,
    on_answer: Callable[[object], None] | None = None,
    cancel: Callable[[], bool] | None = None,
) -> tuple[list, bool]:
    """``[fn(job) for job in jobs]`` in ``workers`` processes, in the order they finish, and
    whether ``cancel()`` stopped it first; ``on_answer(value)`` as each one arrives.
    ``fn`` must be a module-level function."""
    ctx = multiprocessing.get_context("spawn")
    tasks, answers = ctx.Queue(), ctx.Queue()
    for k, job in enumerate(jobs):
        tasks.put((k, job))
    for _ in range(workers):
        tasks.put(None)
    procs = [
        ctx.Process(target=_worker, args=(fn, tasks, answers), daemon=True) for _ in range(workers)
    ]
    for p in procs:
        p.start()
    out: list = []
    try:
        while len(out) < len(jobs):
            if cancel is not None and cancel():
                return out, True
            try:
                _, ok, value = answers.get(timeout=WAIT_S)
            except queue.Empty:
                dead = [p.exitcode for p in procs if p.exitcode not in (None, 0)]
                if dead or all(p.exitcode is not None for p in procs):
                    raise EngineError(
                        "mechanism check: a worker process stopped "
                        f"(exit code {dead[0] if dead else 0}) before it finished"
                    ) from None
                continue
            if not ok:
                raise EngineError(f"mechanism check failed in a worker process: {value}")
            out.append(value)
            if on_answer is not None:
                on_answer(value)
        return out, False
    finally:
        for p in procs:
            if p.is_alive():
                p.terminate()
        for p in procs:
            p.join(timeout=2.0)
        for q in (tasks, answers):
            q.cancel_join_thread()
            q.close()
