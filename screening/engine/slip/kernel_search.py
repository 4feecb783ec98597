"""The compiled slip search: :mod:`screening.engine.slip.kernel` compiled with numba, and
when to use it.

Two compiled entry points: every circle of a batch (:func:`evaluate_circles`) and every
round of the pattern search of every start of every segment in one call (:func:`refine`),
instead of a numpy round trip per round. They give the numpy path's circles
(tests/unit/test_slip_kernel.py checks it).

The compilation (``cache=True``: only the first run on a machine pays for it, a few seconds
that bench/bench_speed.py prints) runs in a background thread, so a screen never waits for
the compiler unless it asks to (:func:`warm_up`); until :func:`ready`, the search takes the
numpy path, and one screen keeps one path (:func:`pinned`).
"""

from __future__ import annotations

import contextlib
import threading
import time
from types import SimpleNamespace as NS

import numpy as np

from screening.engine.slip import kernel

SETTLE = 1e10
"""Factors are compared on a 1e-10 grid (search.SETTLE says why)."""


FASTMATH = {"reassoc", "contract", "arcp", "nsz"}
"""No NaN or inf assumptions (the kernel relies on both); sums may be reordered."""
_CIRCLES = None
_REFINE = None
_FAILED = False
_THREAD: threading.Thread | None = None
_LOCK = threading.Lock()


def ready() -> bool:
    """True when the compiled kernels are loaded and may be used; the search takes the numpy
    path until then (the same numbers)."""
    return kernel.available() and _REFINE is not None


_PINNED = threading.local()


def use() -> bool:
    """Whether the search in this thread uses the compiled kernels: what :func:`ready` said
    when the thread's screen began (:func:`pinned`), else what it says now."""
    value = getattr(_PINNED, "value", None)
    return ready() if value is None else value and kernel.available()


@contextlib.contextmanager
def pinned():
    """One screen, one path: the kernels finishing their load half-way through a screen do
    not change its path, so a screen's numbers never depend on when they did (the two paths
    agree to rounding, but a rare circle lying on a family or validity edge can take the
    search another way)."""
    outer = getattr(_PINNED, "value", None)
    _PINNED.value = ready() if outer is None else outer
    try:
        yield
    finally:
        _PINNED.value = outer


def start() -> None:
    """Compile the kernels, or load them from numba's cache, in a background thread (once).

    The thread is not a daemon: a short process waits for it at exit, so the compiled code
    reaches numba's cache and the next run only loads it (well under a second)."""
    global _THREAD
    if not kernel.available() or ready() or _FAILED:
        return
    with _LOCK:
        if _THREAD is None:
            _THREAD = threading.Thread(target=_build, name="wallscreen-slip-kernel")
            _THREAD.start()


def warm_up() -> float:
    """Compile or load the kernels and wait for them; seconds waited (0 when ready)."""
    if not kernel.available() or ready():
        return 0.0
    begin = time.perf_counter()
    start()
    if _THREAD is not None:
        _THREAD.join()
    return time.perf_counter() - begin


def _build() -> None:
    global _CIRCLES, _REFINE, _FAILED
    try:
        import numba

        def jit(fn, **kw):
            return numba.njit(cache=True, nogil=True, error_model="numpy", **kw)(fn)

        for name in ("_ground", "_below_base", "_circle"):
            setattr(kernel, name, jit(getattr(kernel, name), fastmath=FASTMATH, inline="always"))
        kernel._fractions = jit(kernel._fractions)
        kernel._row = jit(kernel._row, fastmath=FASTMATH)
        circles, refine_ = jit(kernel._circles), jit(kernel._refine)
        _try(circles, refine_)
        _CIRCLES, _REFINE = circles, refine_
    except Exception:  # noqa: BLE001 - any failure to compile leaves the numpy path in use
        _FAILED = True


def _arrays(section, soils, layers, params, counts, kh):
    f64 = kernel._f64
    sec, soil, lay = kernel.pack(section, soils, layers)
    return sec, soil, lay, f64(params), np.asarray(counts, dtype=np.int64), f64(kh)


def evaluate_circles(section, soils, layers, params, counts, kh, tol, max_it, compiled=None):
    """Factor (n, c; inf where invalid, internal or not driving), convergence (n, c), family
    (n, c; -1 invalid, -2 internal) and centre x, y, radius and driving moment (n, c, 4) of
    every circle, by the compiled kernel (:func:`ready` must be True)."""
    n, c = params.shape[0], params.shape[1]
    out = (
        np.empty((n, c)), np.empty((n, c), dtype=np.bool_), np.empty((n, c), dtype=np.int64),
        np.empty((n, c, 4)),
    )  # fmt: skip
    sec, soil, lay, p, cnt, k = _arrays(section, soils, layers, params, counts, kh)
    (compiled or _CIRCLES)(sec, soil, lay, p, cnt, k, float(tol), int(max_it), *out)
    return out


def refine(section, soils, layers, bounds, bp, bf, steps, family, moves, overlap, index,
           rounds, counts, kh, tol, max_it, fam_f, fam_p, compiled=None):  # fmt: skip
    """Run ``rounds`` of the pattern search; returns the new (bp, bf, fam_f, fam_p)."""
    f64 = kernel._f64
    bp, bf, steps = f64(bp).copy(), f64(bf).copy(), f64(steps).copy()
    fam_f, fam_p = f64(fam_f).copy(), f64(fam_p).copy()
    limits = (
        f64(bounds.exit_min_m), f64(bounds.exit_max_m),
        f64(bounds.entry_min_m), f64(bounds.entry_max_m),
    )  # fmt: skip
    angles = np.array([bounds.angle_min_rad, bounds.angle_max_rad], dtype=np.float64)
    sec, soil, lay, _, cnt, k = _arrays(section, soils, layers, bp, counts, kh)
    (compiled or _REFINE)(
        sec, soil, lay, cnt, k, float(tol), int(max_it), limits, angles, bp, bf, steps,
        np.asarray(family, dtype=np.int64), f64(moves),
        np.ascontiguousarray(overlap, dtype=np.bool_), np.asarray(index, dtype=np.int64),
        int(rounds), fam_f, fam_p, float(SETTLE),
    )  # fmt: skip
    return bp, bf, fam_f, fam_p


def _try(circles, refine_) -> None:
    """Run both compiled kernels once on a one-circle problem (compiles or loads them)."""
    one = np.ones((1, 1))
    section = NS(
        ground_x_m=np.array([[-10.0, 0.0, 0.0, 10.0]]), ground_y_m=np.array([[0.5, 0.5, 3.0, 3.0]]),
        height_m=np.full(1, 3.0), length_m=np.full(1, 2.0), water_level_m=np.full(1, -np.inf),
        surcharge_kpa=np.zeros(1), floor_m=np.full(1, -6.0),
    )  # fmt: skip
    soils = NS(
        unit_weight_kn_m3=np.full((1, 3), 19.0), cohesion_kpa=np.zeros((1, 3)),
        tan_phi=np.full((1, 3), 0.6),
    )  # fmt: skip
    layers = NS(
        level_m=one, mask=np.ones((1, 1), dtype=bool), rupture_kn_m=one, pullout_kn_m2=one,
        front_kn_m=one, tangent=np.zeros((1, 1), dtype=bool),
    )  # fmt: skip
    first = np.array([[[-1.0, 2.0, 1.0]]])
    evaluate_circles(section, soils, layers, first, (6, 12, 10), np.zeros(1), 1e-4, 60, circles)
    bounds = NS(
        exit_min_m=np.full(1, -5.0), exit_max_m=np.zeros(1), entry_min_m=np.full(1, 0.1),
        entry_max_m=np.full(1, 9.0), angle_min_rad=0.1, angle_max_rad=2.6,
    )  # fmt: skip
    refine(
        section, soils, layers, bounds, first, np.ones((1, 1)), np.full((1, 1, 3), 0.1),
        np.array([-1]), np.eye(3), np.zeros((3, 3), dtype=bool), np.full(27, -1), 1,
        (6, 12, 10), np.zeros(1), 1e-4, 60, np.full((1, 2), np.inf), np.zeros((1, 2, 3)),
        refine_,
    )  # fmt: skip
