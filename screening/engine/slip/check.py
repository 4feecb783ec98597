"""Compound and global stability of ``n`` wall segments under a factor set (METHOD section 6).

Runs the slip-circle search of :mod:`screening.engine.slip.search` on the cross-sections of
:mod:`screening.engine.slip.wall` for each load case of the factor set (and, on a foundation
with cu, short term and long term), and keeps per segment the worst critical circle of each
family with its CDR. The rules for each kind of factor set are in :mod:`screening.engine.slip.compound`.
"""

from __future__ import annotations

from dataclasses import dataclass, fields, replace

import numpy as np

from screening.engine.result import CDR_CAP, BoolArray, FloatArray
from screening.engine.slip.density import STANDARD, WARM, WARM_GRID, SearchDensity
from screening.engine.slip.search import CriticalCircle, SlipSearch, search
from screening.engine.slip.wall import (
    Factors,
    WallSlipInput,
    wall_bounds,
    wall_grid,
    wall_layers,
    wall_section,
    wall_soils,
)


@dataclass(frozen=True)
class FamilyCheck:
    """One family (compound or global) per segment, governing case; (n,) arrays."""

    demand: FloatArray
    """Driving moment of the critical circle, kN.m/m (with the case's load factors)."""
    capacity: FloatArray
    """Factored resisting moment = CDR * demand, kN.m/m."""
    cdr: FloatArray
    factor: FloatArray
    """Bishop F of the critical circle (strengths divided by the case's partial factors)."""
    case: list[str]
    centre_x_m: FloatArray
    centre_y_m: FloatArray
    radius_m: FloatArray
    converged: BoolArray
    found: BoolArray
    params: FloatArray
    """(n, 3) search parameters of the critical circle: x_exit, x_entry (m), angle (rad)."""


@dataclass(frozen=True)
class CompoundResult:
    compound: FamilyCheck
    global_: FamilyCheck


def factor_cases(method: str, cases) -> list[Factors]:
    """The slip-search cases of a factor set (see the module docstring).

    ``cases`` is a sequence of objects with the LoadCase fields (model or CaseArrays rows).
    """
    if method in ("lrfd", "asd"):
        return [Factors("Service I" if method == "lrfd" else "Service (unfactored)")]
    out = []
    for c in cases:
        if isinstance(c, Factors):
            out.append(c)
            continue
        if "compound" not in getattr(c, "checks", ("compound",)):
            continue
        out.append(Factors(c.name, c.ev, c.es, c.ls, c.tan_phi, c.cohesion, c.undrained))
    return out or [Factors("unfactored")]


def compound_check(
    inp: WallSlipInput,
    method: str,
    resistance: dict[str, float],
    cases=(),
    density: SearchDensity = STANDARD,
    kh: FloatArray | None = None,
    warm: FloatArray | None = None,
) -> CompoundResult:
    """Critical compound and global circles of every segment with their CDR.

    ``resistance`` needs ``compound`` (and ``compound_abutment``, defaulting to it);
    ``cases`` the factor set's load cases (used by partial-factor sets); ``kh`` an optional
    pseudo-static horizontal coefficient per segment (n,). ``warm`` (n, k, 3): circles known
    to be near-critical (the same segments at other lengths; NaN where none); rows with any
    are refined from them with :data:`WARM` instead of a full search.
    """
    unique, inverse = _distinct_rows(inp, kh, warm) if inp.n > 1 else (np.zeros(1), None)
    if unique.size < inp.n:
        # Equal cross-sections (a profile gives many) are searched once.
        pick = lambda a: None if a is None else np.asarray(a)[unique]  # noqa: E731
        once = compound_check(
            inp.take(unique), method, resistance, cases, density, pick(kh), pick(warm)
        )
        return CompoundResult(_expand(once.compound, inverse), _expand(once.global_, inverse))
    n = inp.n
    phi = np.where(
        inp.abutment,
        resistance.get("compound_abutment", resistance["compound"]),
        resistance["compound"],
    )
    layers = wall_layers(inp)
    drained_rows = np.arange(n)
    undrained_rows = np.flatnonzero(np.isfinite(inp.found_undrained_kpa))
    best = {name: _empty(n) for name in ("compound", "global")}
    for f in factor_cases(method, cases):
        for undrained, rows in ((False, drained_rows), (True, undrained_rows)):
            if rows.size == 0:
                continue
            sub = inp.take(rows)
            section = wall_section(sub, f)
            if undrained:
                section = replace(section, water_level_m=np.full(rows.size, -np.inf))
            soils = wall_soils(sub, f, undrained)
            sub_layers = _take(layers, rows)
            sub_kh = np.zeros(rows.size) if kh is None else np.asarray(kh, dtype=np.float64)[rows]
            found = _search_rows(sub, section, soils, sub_layers, density, sub_kh, warm, rows)
            # "long term" only where a foundation with cu is also checked short term (per
            # row, so a segment's words never depend on the other segments of the batch).
            term = "short term (cu)" if undrained else "long term"
            label = np.where(
                np.isfinite(sub.found_undrained_kpa), f"{f.name}, {term}", f.name
            ).astype(object)
            for name in best:
                circ = found.family(name)
                drive = circ.drive_knm_m
                _merge(best[name], rows, circ, phi[rows], label, drive)
    return CompoundResult(_finish(best["compound"]), _finish(best["global"]))


def _distinct_rows(inp: WallSlipInput, kh, warm) -> tuple[np.ndarray, np.ndarray]:
    """Rows with distinct inputs (first of each) and, per row, its place among them: rows
    equal in every input field, kh and known circles have the same result."""
    values = [getattr(inp, f.name) for f in fields(inp)]
    cols = [np.asarray(v, dtype=np.float64).reshape(inp.n, -1) for v in values if v is not None]
    for extra in (kh, warm):
        if extra is not None:
            cols.append(np.asarray(extra, dtype=np.float64).reshape(inp.n, -1))
    table = np.ascontiguousarray(np.concatenate(cols, axis=1))
    rows = table.view(np.dtype((np.void, table.dtype.itemsize * table.shape[1])))[:, 0]
    _, unique, inverse = np.unique(rows, return_index=True, return_inverse=True)
    return unique, inverse.reshape(-1)


def _expand(check: FamilyCheck, inverse: np.ndarray) -> FamilyCheck:
    """A family's result on distinct rows, back on every row."""
    return FamilyCheck(
        **{
            f.name: (
                [getattr(check, f.name)[i] for i in inverse.tolist()]
                if isinstance(getattr(check, f.name), list)
                else getattr(check, f.name)[inverse]
            )
            for f in fields(check)
        }
    )


def _search_rows(sub, section, soils, layers, density, kh, warm, rows) -> SlipSearch:
    """Full search, or a warm refinement on the rows with known circles; merged by row."""
    bounds = wall_bounds(sub)
    known = np.zeros(rows.size, dtype=bool)
    if warm is not None:
        good = np.all(np.isfinite(warm[rows]), axis=2)  # (r, k) circles known
        known = good.any(axis=1)
        first = np.argmax(good, axis=1)
        fill = np.take_along_axis(warm[rows], first[:, None, None], 1)
        warm_rows = np.where(good[..., None], warm[rows], fill)
    if not known.any():
        return search(
            section,
            soils,
            layers,
            wall_grid(sub, density)[0],
            bounds,
            density,
            kh,
            start_groups=len(density.exit_fractions),
        )
    parts = []
    # The grid circles only where a full search runs (rows without known circles, or lost).
    grid = wall_grid(sub, density)[0] if not known.all() else None
    for use_warm, pick in ((False, np.flatnonzero(~known)), (True, np.flatnonzero(known))):
        if pick.size == 0:
            parts.append((pick, None))
            continue
        sec = _take(section, pick)
        so = _take(soils, pick)
        lay = _take(layers, pick)
        b = _take(bounds, pick)
        if use_warm:
            h = sub.height_m[pick]
            # First steps 0.15H and 8 degrees (0.05H and 4 before): far enough to leave the
            # known circle's basin when the critical one has moved with L (2,000 segments
            # against a fine search at every length: the largest shortfall in L 1.0 -> 0.3 m)
            steps = np.stack([0.15 * h, 0.15 * h, np.full(pick.size, np.radians(8.0))], axis=-1)
            here = sub.take(pick)
            seeds = _global_seeds(here, warm_rows[pick])
            start = np.concatenate([warm_rows[pick], seeds, wall_grid(here, WARM_GRID)[0]], 1)
            found = search(sec, so, lay, start, b, WARM, kh[pick], initial_steps=steps)
            # A family lost (every known circle of it changed family with L): full search.
            # Known circles come in (compound, global) pairs, so odd places are global.
            had_global = np.any(np.all(np.isfinite(warm[rows][pick, 1::2]), axis=2), axis=1)
            lost = np.flatnonzero(~found.compound.found | (had_global & ~found.global_.found))
            if lost.size:
                grid = wall_grid(sub, density)[0] if grid is None else grid
                again = search(
                    _take(sec, lost),
                    _take(so, lost),
                    _take(lay, lost),
                    grid[pick][lost],
                    _take(b, lost),
                    density,
                    kh[pick][lost],
                    start_groups=len(density.exit_fractions),
                )
                found = _join(
                    pick.size,
                    [
                        (
                            np.setdiff1d(np.arange(pick.size), lost),
                            _take_search(found, np.setdiff1d(np.arange(pick.size), lost)),
                        ),
                        (lost, again),
                    ],
                )
        else:
            found = search(
                sec,
                so,
                lay,
                grid[pick],
                b,
                density,
                kh[pick],
                start_groups=len(density.exit_fractions),
            )
        parts.append((pick, found))
    return _join(rows.size, parts)


def _global_seeds(inp: WallSlipInput, known: FloatArray) -> FloatArray:
    """Deep circles under the reinforced zone (n, 8 + k, 3), so a warm refinement always has
    a start in the global family even when the known global circle turned compound: four
    generic ones at 70-90 degrees, four steeper ones (a shallow foundation's or a toe slope's
    global circle runs far out and deep), and each known circle ``known`` (n, k, 3) stretched
    behind the new length and turned 10 degrees deeper (a longer block lifts the old circle
    into it; NaN rows stay NaN and are filled as the known ones are)."""
    h, length = inp.height_m, inp.length_m
    exit_ = np.stack([-0.5 * h] * 2 + [-1.0 * h] * 2 + [-1.5 * h] * 2 + [-1.0 * h] * 2, axis=1)
    entry = np.stack([length + 0.3 * h, length + h] * 2 + [length + h, length + 2.0 * h] * 2, 1)
    degrees = [80.0, 70.0, 90.0, 80.0, 115.0, 125.0, 110.0, 130.0]
    angle = np.broadcast_to(np.radians(degrees), exit_.shape)
    generic = np.stack([exit_, entry, angle], axis=-1)
    stretched = known.copy()
    stretched[..., 1] = (
        np.maximum(known[..., 1], length[:, None] + 0.1 * h[:, None]) + 0.1 * h[:, None]
    )
    stretched[..., 2] = known[..., 2] + np.radians(10.0)
    return np.concatenate([generic, stretched], axis=1)


def _take(obj, pick):
    """A slip dataclass restricted to rows ``pick`` (array fields with a leading row axis);
    the object itself when ``pick`` is every row in order (the dataclasses are frozen)."""
    pick = np.asarray(pick)
    n = next((v.shape[0] for v in vars(obj).values() if isinstance(v, np.ndarray)), -1)
    if pick.dtype != bool and pick.size == n and np.array_equal(pick, np.arange(n)):
        return obj
    return replace(
        obj,
        **{
            f.name: getattr(obj, f.name)[pick]
            for f in fields(obj)
            if isinstance(getattr(obj, f.name), np.ndarray)
        },
    )


def _take_search(found: SlipSearch, pick) -> SlipSearch:
    return SlipSearch(_take(found.compound, pick), _take(found.global_, pick), found.circles_tried)


def _join(n: int, parts) -> SlipSearch:
    whole = [found for pick, found in parts if found is not None and pick.size == n]
    if whole:  # one part holds every row, in order (the picks are sorted and disjoint)
        return whole[0]
    out = {}
    for fam in ("compound", "global_"):
        values = {}
        for key in CriticalCircle.__dataclass_fields__:
            dtype = bool if key in ("converged", "found") else np.float64
            values[key] = np.zeros(n, dtype=dtype)
            for pick, found in parts:
                if found is not None:
                    values[key][pick] = getattr(getattr(found, fam), key)
        out[fam] = CriticalCircle(**values)
    return SlipSearch(out["compound"], out["global_"], 0)


def _empty(n: int) -> dict:
    return {
        "cdr": np.full(n, np.inf),
        "factor": np.full(n, np.inf),
        "demand": np.zeros(n),
        "case": np.full(n, "", dtype=object),
        "centre_x_m": np.full(n, np.nan),
        "centre_y_m": np.full(n, np.nan),
        "radius_m": np.full(n, np.nan),
        "converged": np.ones(n, dtype=bool),
        "found": np.zeros(n, dtype=bool),
        "params": np.full((n, 3), np.nan),
    }


def _merge(acc: dict, rows, circ: CriticalCircle, phi, label: np.ndarray, drive) -> None:
    cdr = circ.factor * phi
    worse = cdr < acc["cdr"][rows]
    idx = rows[worse]
    acc["cdr"][idx] = cdr[worse]
    acc["factor"][idx] = circ.factor[worse]
    acc["demand"][idx] = drive[worse]
    for key in ("centre_x_m", "centre_y_m", "radius_m", "converged", "found"):
        acc[key][idx] = getattr(circ, key)[worse]
    acc["case"][idx] = label[worse]
    params = np.stack([circ.x_exit_m, circ.x_entry_m, circ.angle_rad], axis=-1)
    acc["params"][idx] = params[worse]


def _finish(acc: dict) -> FamilyCheck:
    cdr = np.clip(np.where(np.isfinite(acc["cdr"]), acc["cdr"], CDR_CAP), 0.0, CDR_CAP)
    demand = np.clip(acc["demand"], 0.0, None)
    return FamilyCheck(
        demand=demand,
        capacity=cdr * demand,
        cdr=cdr,
        factor=acc["factor"],
        case=acc["case"].tolist(),
        centre_x_m=acc["centre_x_m"],
        centre_y_m=acc["centre_y_m"],
        radius_m=acc["radius_m"],
        converged=acc["converged"],
        found=acc["found"],
        params=acc["params"],
    )
