"""Search for the critical slip circle of every segment at once (METHOD section 6).

Two stages, both vectorised over segments x circles x slices:

1. a grid of circles per segment (exit point x entry point x subtended angle);
2. a pattern search from the best grid circle of each family: try one step either way on each
   of the three parameters, move to the best improvement, halve the steps when none improves.

Each circle is put in a family by :mod:`screening.engine.slip.family` (compound, global or
internal; internal circles are the tie-back checks' job and are not searched); how many
circles and slices the search tries is :mod:`screening.engine.slip.density`.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from screening.engine.result import BoolArray, FloatArray
from screening.engine.slip import kernel_search
from screening.engine.slip.bishop import MAX_ITERATIONS, TOLERANCE, SliceForces, bishop_factor
from screening.engine.slip.density import STANDARD, SearchDensity
from screening.engine.slip.family import COMPOUND, GLOBAL, INVALID, classify
from screening.engine.slip.geometry import (
    Circles,
    SlipLayers,
    SlipSection,
    SlipSoils,
    make_circles,
    make_slices,
    reinforcement_moment,
)
from screening.engine.slip.moves import MOVE_SETS, known_points, move_tables

CHUNK_CIRCLES = 16_000
"""Segment-circles evaluated together (x slices each): bounds memory, keeps numpy busy."""


@dataclass(frozen=True)
class Bounds:
    """Limits of the three circle parameters, (n,) each (angles in radians)."""

    exit_min_m: FloatArray
    exit_max_m: FloatArray
    entry_min_m: FloatArray
    entry_max_m: FloatArray
    angle_min_rad: float = np.radians(5.0)
    angle_max_rad: float = np.radians(150.0)


@dataclass(frozen=True)
class CriticalCircle:
    """The least factor of one family per segment, (n,) arrays; inf/NaN where none exists."""

    factor: FloatArray
    centre_x_m: FloatArray
    centre_y_m: FloatArray
    radius_m: FloatArray
    x_exit_m: FloatArray
    x_entry_m: FloatArray
    angle_rad: FloatArray
    """Angle the arc subtends at the centre (with x_exit_m, x_entry_m: the search parameters)."""
    converged: BoolArray
    found: BoolArray
    drive_knm_m: FloatArray | None = None
    """Driving moment about the centre (with any pseudo-static part), kN.m/m; 0 where none."""


@dataclass(frozen=True)
class SlipSearch:
    compound: CriticalCircle
    global_: CriticalCircle
    circles_tried: int
    """Circles evaluated per segment (grid plus refinement)."""

    def family(self, name: str) -> CriticalCircle:
        return self.compound if name == "compound" else self.global_

    @property
    def least(self) -> CriticalCircle:
        """The lower of the two families, per segment."""
        pick = self.global_.factor < self.compound.factor
        return CriticalCircle(
            *(np.where(pick, getattr(self.global_, f), getattr(self.compound, f)) for f in _FIELDS)
        )


_FIELDS = (
    "factor",
    "centre_x_m",
    "centre_y_m",
    "radius_m",
    "x_exit_m",
    "x_entry_m",
    "angle_rad",
    "converged",
    "found",
    "drive_knm_m",
)


def evaluate(
    section: SlipSection,
    soils: SlipSoils,
    layers: SlipLayers,
    circles: Circles,
    slices: tuple[int, int, int],
    kh: FloatArray,
) -> tuple[FloatArray, BoolArray]:
    """Bishop factor and convergence of every circle, (n, c); inf for invalid circles.

    ``kh`` (n,) adds a pseudo-static horizontal force kh*W at each slice's mid-height, whose
    moment about the centre drives the mass outwards.
    """
    return _evaluate(section, soils, layers, circles, slices, kh)[:2]


def _evaluate(section, soils, layers, circles, slices, kh):
    """:func:`evaluate` and the driving moment of every circle (n, c), kN.m/m."""
    sl = make_slices(section, soils, circles, slices)
    forces = SliceForces(
        sl.weight_kn,
        sl.width_m,
        sl.sin_a,
        sl.cos_a,
        sl.cohesion_kpa,
        sl.tan_phi,
        sl.pore_kpa,
        circles.radius_m,
    )
    if np.any(kh):
        lever = circles.centre_y_m[..., None] - 0.5 * (sl.base_y_m + sl.top_y_m)
        drive = kh[:, None] * np.sum(sl.weight_kn * lever, axis=-1)
    else:  # no pseudo-static force: skip the moment sum (the same zeros, in the same dtype)
        drive = np.zeros(circles.radius_m.shape, dtype=np.result_type(kh, sl.weight_kn))
    restoring = reinforcement_moment(section, layers, circles)
    result = bishop_factor(forces, restoring, drive)
    value = np.where(circles.valid, result.value, np.inf)
    total = circles.radius_m * np.add.reduce(sl.weight_kn * sl.sin_a, axis=-1) + drive
    return value, result.converged | ~circles.valid, total


def _evaluate_params(section, soils, layers, params, density, kh):
    """params (n, c, 3) -> factor, converged, family, circles (centre x, y, radius, driving
    moment: (n, c, 4)); evaluated in chunks of circles
    (or all at once by the compiled kernel, in double precision)."""
    n, c, _ = params.shape
    if kernel_search.use():
        return kernel_search.evaluate_circles(
            section, soils, layers, params, density.slices, kh, TOLERANCE, MAX_ITERATIONS
        )
    kernel_search.start()  # compiled in the background; the numpy path meanwhile
    # A chunk holds about CHUNK_CIRCLES segment-circles: few segments, many circles at once.
    step = max(1, density.circles_per_chunk, CHUNK_CIRCLES // max(n, 1))
    out_f, out_ok, out_cls, out_geo = [], [], [], []
    for start in range(0, c, step):  # chunks of trial circles, never of segments
        p = params[:, start : start + step]
        circles = make_circles(section, p[..., 0], p[..., 1], p[..., 2])
        f, ok, drive = _evaluate(section, soils, layers, circles, density.slices, kh)
        cls = classify(section, circles)
        out_f.append(np.where(cls >= 0, f, np.inf))  # internal circles are not searched
        out_ok.append(ok)
        out_cls.append(cls)
        out_geo.append(
            np.stack([circles.centre_x_m, circles.centre_y_m, circles.radius_m, drive], -1)
        )
    cat = np.concatenate
    return cat(out_f, 1), cat(out_ok, 1), cat(out_cls, 1), cat(out_geo, 1)


SETTLE = kernel_search.SETTLE
"""Factors are compared as multiples of 1/SETTLE (1e-10): circles whose factors differ only
by rounding (1e-15) tie, and the first of them is taken, so neither the order of a sum nor
which path evaluated a circle (compiled or numpy) can turn the search another way. Before,
such ties went either way and a search could end in another local minimum."""


def settled(f: FloatArray) -> FloatArray:
    """``f`` rounded to the nearest multiple of 1/SETTLE (inf stays inf)."""
    return np.rint(f * SETTLE) / SETTLE


def _pick(a: np.ndarray, j: np.ndarray, n_moves: int) -> np.ndarray:
    """Rows of ``a`` (n, S*M, ...) at move ``j`` (n, S) of each start -> (n, S, ...)."""
    n, s_count = j.shape
    a = a.reshape(n, s_count, n_moves, *a.shape[2:])
    idx = j.reshape(n, s_count, 1, *(1,) * (a.ndim - 3))
    return np.take_along_axis(a, idx, 2)[:, :, 0]


def _clip_params(p: FloatArray, bounds: Bounds) -> FloatArray:
    shape = (-1, *(1,) * (p.ndim - 2))
    lo, hi = bounds.exit_min_m.reshape(shape), bounds.exit_max_m.reshape(shape)
    e = np.minimum(np.maximum(p[..., 0], lo), hi)
    n_lo = np.maximum(bounds.entry_min_m.reshape(shape), e + 1e-3)
    n = np.minimum(np.maximum(p[..., 1], n_lo), np.maximum(bounds.entry_max_m.reshape(shape), n_lo))
    a = np.minimum(np.maximum(p[..., 2], bounds.angle_min_rad), bounds.angle_max_rad)
    return np.stack([e, n, a], axis=-1)


def _along(a: np.ndarray, idx: np.ndarray) -> np.ndarray:
    """``a`` (n, c, ...) at columns ``idx`` (n, k) of each row -> (n, k, ...): what
    ``np.take_along_axis`` on axis 1 gives, by plain indexing (a search calls it ~20 times)."""
    return a[np.arange(a.shape[0])[:, None], idx]


def _diverse_starts(f: FloatArray, groups: int, starts: int) -> np.ndarray:
    """Indices (n, k) of the grid circles to refine: the columns of ``f`` form ``groups`` equal
    consecutive groups (e.g. one per exit point); take the best circle of each group, then the
    ``starts`` best of those, so the starts lie in different parts of the section."""
    n, c = f.shape
    groups = groups if groups > 0 and c % groups == 0 else 1
    per = c // groups
    best_in = np.argmin(f.reshape(n, groups, per), axis=2) + np.arange(groups)[None, :] * per
    val = _along(f, best_in)
    rank = np.argsort(val, axis=1, kind="stable")[:, : max(1, starts)]
    return _along(best_in, rank)


def _keep_family_best(fam_f, fam_p, f, cls, params):
    """Update the best factor (n, 2) and circle (n, 2, 3) of each family from a batch."""
    rows = np.arange(f.shape[0])
    for fam in (COMPOUND, GLOBAL):
        ff = np.where(cls == fam, f, np.inf)
        j = np.argmin(ff, axis=1)
        val = ff[rows, j].astype(np.float64)
        better = val < fam_f[:, fam]
        fam_f[:, fam] = np.where(better, val, fam_f[:, fam])
        fam_p[:, fam] = np.where(better[:, None], params[rows, j], fam_p[:, fam])
    return fam_f, fam_p


def search(
    section: SlipSection,
    soils: SlipSoils,
    layers: SlipLayers,
    grid: FloatArray,
    bounds: Bounds,
    density: SearchDensity = STANDARD,
    kh: FloatArray | None = None,
    initial_steps: FloatArray | None = None,
    start_groups: int = 1,
) -> SlipSearch:
    """Critical compound and global circles of every segment.

    ``grid`` is (n, c, 3): x_exit (m), x_entry (m), subtended angle (rad) of the grid circles;
    ``initial_steps`` (n, 3) the first pattern-search steps (default: a fraction of each range);
    ``start_groups`` splits the grid columns into equal groups whose best circles are the
    candidate starts of the pattern search (``density.starts`` of them, best first).
    The grid and the pattern search use ``density.search_slices``; the best circle of every
    start is then evaluated again with ``density.slices`` and in double precision.
    """
    n = section.n
    kh = np.zeros(n) if kh is None else np.asarray(kh, dtype=np.float64)
    # Double precision throughout: the compiled kernel and the numpy path give the same
    # numbers (a float32 search, as before, differed from them by about 1e-5 in F).
    fast = (section, soils, layers)
    coarse = replace(density, slices=density.search_slices)
    grid = _clip_params(grid, bounds)
    f, _, cls, _ = _evaluate_params(*fast, grid, coarse, kh)
    f = settled(f)
    tried = grid.shape[1]
    if initial_steps is None:
        initial_steps = np.stack(
            [
                0.2 * (bounds.exit_max_m - bounds.exit_min_m),
                0.1 * (bounds.entry_max_m - bounds.entry_min_m),
                np.full(n, np.radians(10.0)),
            ],
            axis=-1,
        )
    # Best circle of each family among everything evaluated (kept as the search goes).
    fam_f = np.full((n, 2), np.inf)
    fam_p = np.zeros((n, 2, 3))
    fam_f, fam_p = _keep_family_best(fam_f, fam_p, f, cls, grid)
    # Pattern search from the ``starts`` best grid circles, whatever their family, and from
    # the best grid circle of each family kept within that family.
    # Each family also starts from its best circles in different parts of the section
    # (different exit groups), so one family's second basin is not lost.
    order = _diverse_starts(f, start_groups, density.starts)  # (n, k)
    free = order.shape[1]
    per = max(1, density.family_starts)
    own = [
        _diverse_starts(np.where(cls == fam, f, np.inf), start_groups, per)
        for fam in (COMPOUND, GLOBAL)
    ]
    picks = np.concatenate([order, *own], axis=1)
    bp = _along(grid, picks)
    bf = _along(f, picks).astype(np.float64)
    k = bp.shape[1]
    family = np.array(  # INVALID: any family
        [INVALID] * free + [COMPOUND] * own[0].shape[1] + [GLOBAL] * own[1].shape[1]
    )
    steps = np.repeat(initial_steps[:, None, :], k, axis=1)
    moves = MOVE_SETS.get(density.moves, MOVE_SETS[6])
    n_moves = moves.shape[0]
    wanted = np.repeat(family, n_moves)[None, :]
    overlap, index = move_tables(moves)
    last = np.full((n, k), -1, dtype=np.int64)
    unclipped = np.zeros((n, k), dtype=bool)
    rounds = density.refine_steps
    if kernel_search.use():  # the same rounds, compiled
        bp, bf, fam_f, fam_p = kernel_search.refine(
            *fast, bounds, bp, bf, steps, family, moves, overlap, index, rounds,
            coarse.slices, kh, TOLERANCE, MAX_ITERATIONS, fam_f, fam_p,
        )  # fmt: skip
        tried += rounds * k * n_moves
        rounds = 0
    for _ in range(rounds):
        raw = bp[:, :, None, :] + moves[None, None] * steps[:, :, None, :]  # (n, k, M, 3)
        cand = _clip_params(raw, bounds)
        skip = known_points(bp, cand, moves, index, last, unclipped)
        # Points already known are not evaluated again (NaN: the kernel skips them at once).
        todo = np.where(skip[..., None], np.nan, cand).reshape(n, k * n_moves, 3)
        cand = cand.reshape(n, k * n_moves, 3)
        cf, _, ccls, _ = _evaluate_params(*fast, todo, coarse, kh)
        cf = settled(cf)
        tried += k * n_moves
        fam_f, fam_p = _keep_family_best(fam_f, fam_p, cf, ccls, cand)
        cf = np.where((wanted == INVALID) | (ccls == wanted), cf, np.inf).reshape(n, k, n_moves)
        j = np.argmin(cf, axis=-1)
        pick = np.min(cf, axis=-1)  # the value at j (both take the first NaN, if any)
        better = np.isfinite(pick) & (pick < bf - 1e-6)
        bp = np.where(better[..., None], _pick(cand, j, n_moves), bp)
        bf = np.where(better, pick, bf)
        steps = np.where(better[..., None], steps, 0.5 * steps)
        last = np.where(better, j, -1)
        unclipped = np.all(
            _pick(cand, j, n_moves) == _pick(raw.reshape(cand.shape), j, n_moves), -1
        )
    # The starts' circles and each family's best once more, full slices, double precision.
    final_p = np.concatenate([bp, fam_p], axis=1)  # (n, k + 2, 3)
    ff, fok, fcls, fgeo = _evaluate_params(section, soils, layers, final_p, density, kh)
    ff = settled(ff)
    tried += k + 2
    ff = np.where(np.isfinite(np.concatenate([bf, fam_f], axis=1)), ff, np.inf)
    take = np.stack(
        [np.argmin(np.where(fcls == fam, ff, np.inf), axis=1) for fam in (COMPOUND, GLOBAL)], 1
    )  # (n, 2)
    own = _along(fcls, take)
    bf = np.where(own == np.array([COMPOUND, GLOBAL]), _along(ff, take), np.inf)
    bp = _along(final_p, take)
    bgeo = _along(fgeo, take)
    bok = _along(fok, take)

    def pack(k: int) -> CriticalCircle:
        found = np.isfinite(bf[:, k])
        nan = np.where(found, 0.0, np.nan)
        return CriticalCircle(
            factor=bf[:, k],
            centre_x_m=bgeo[:, k, 0] + nan,
            centre_y_m=bgeo[:, k, 1] + nan,
            radius_m=bgeo[:, k, 2] + nan,
            drive_knm_m=np.where(found, bgeo[:, k, 3], 0.0),
            x_exit_m=bp[:, k, 0] + nan,
            x_entry_m=bp[:, k, 1] + nan,
            angle_rad=bp[:, k, 2] + nan,
            converged=bok[:, k] | ~found,
            found=found,
        )

    return SlipSearch(pack(COMPOUND), pack(GLOBAL), tried)
