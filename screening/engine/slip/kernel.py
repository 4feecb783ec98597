"""One compiled pass per trial circle: circle, validity, family, slices, reinforcement moment
and Bishop's iteration (METHOD section 6), instead of (segments x circles x slices) arrays.

The numbers are those of :mod:`screening.engine.slip.geometry`, :mod:`.family` and
:mod:`.bishop`, rule for rule (tests/unit/test_slip_kernel.py compares them circle by
circle); only the order of the sums over slices and the way a slice's cosine is formed
differ, so a factor agrees to about 1e-12. The kernel always works in double precision.

``_refine`` is the pattern search of :func:`screening.engine.slip.search.search` on these
circles, step for step (the same candidates, skips, choices and family records as its numpy
loop). All of it is in this one file on purpose: numba's cache is invalidated by the file
that holds a function, and a caller in another file would keep a stale copy of the circle
function after an edit here.

Plain Python functions, compiled by :mod:`screening.engine.slip.kernel_search` with numba
(optional: without it, or with :data:`ENABLED` False, the search uses the numpy path).
"""

from __future__ import annotations

import importlib.util
import math

import numpy as np

ENABLED = True
"""Set False to force the numpy path (tests and the benchmark compare the two)."""
WATER = 9.81
"""Unit weight of water, kN/m3 (the same value as geometry.WATER_UNIT_WEIGHT_KN_M3)."""
CUT = 1e-9
"""geometry.CUT_TOLERANCE_M: how far inside the mass a layer must be crossed to count."""


def _ground(gx, gy, i, x):
    """Ground level at x of segment i (geometry.ground_level)."""
    p = 0
    for j in range(1, gx.shape[1] - 1):
        if x > gx[i, j]:
            p += 1
    x0, x1 = gx[i, p], gx[i, p + 1]
    span = x1 - x0
    if span > 0:
        t = (x - x0) / span
        if t < 0.0:
            t = 0.0
        return gy[i, p] + t * (gy[i, p + 1] - gy[i, p])
    return gy[i, p + 1]


def _below_base(xc, yc, r2, x):
    """The lower arc exists at x and lies at or below the base (family.classify)."""
    inside = r2 - (x - xc) ** 2
    return inside >= 0.0 and yc - math.sqrt(max(inside, 0.0)) <= 1e-9


def _fractions(counts):
    """Midpoint of each slice as a fraction of its zone, (s,) (geometry._slice_template)."""
    fracs = np.empty(counts[0] + counts[1] + counts[2])
    k = 0
    for z in range(3):
        for q in range(counts[z]):
            fracs[k] = (q + 0.5) / counts[z]
            k += 1
    return fracs


def _circle(sec, soil, lay, i, xe, xn, ang, counts, fracs, kh_i, tol, max_it, work):
    """One circle of segment i: (F, converged, family, centre x, centre y, radius, driving
    moment about the centre with any pseudo-static part, kN.m/m).

    F is inf where the circle is invalid, internal (family -2) or drives nothing; family -1
    where it is invalid. ``work`` is scratch space (4, slices)."""
    gx, gy, height, length, water, surcharge, floor = sec
    gamma, coh, tphi = soil
    lv, lmask, lrup, lpull, lfront, ltan = lay
    big_l, h = length[i], height[i]
    if not (math.isfinite(xe) and math.isfinite(xn) and math.isfinite(ang)):
        return np.inf, True, -1, np.nan, np.nan, np.nan, np.nan
    # The circle through the two ground points (geometry.make_circles).
    ye, yn = _ground(gx, gy, i, xe), _ground(gx, gy, i, xn)
    vx, vy = xn - xe, yn - ye
    chord = math.hypot(vx, vy)
    safe = chord if chord > 1e-9 else 1.0
    half = min(max(ang, 1e-3), math.pi - 1e-3) / 2
    r = 0.5 * safe / math.sin(half)
    offset = r * math.cos(half)  # 0.5 chord / tan(half)
    xc = 0.5 * (xe + xn) - vy / safe * offset
    yc = 0.5 * (ye + yn) + vx / safe * offset
    r2 = r * r
    valid = vx > 1e-6 and yc >= max(ye, yn) - 1e-9 and math.isfinite(xc) and math.isfinite(yc)
    for v in range(gx.shape[1]):
        if not valid:
            break
        px = gx[i, v]
        if px > xe + 1e-9 and px < xn - 1e-9:
            inside = r2 - (px - xc) ** 2
            valid = inside >= 0.0 and yc - math.sqrt(max(inside, 0.0)) <= gy[i, v] + 1e-9
    if valid:
        low_x = min(max(xc, xe), xn)
        low_y = yc - math.sqrt(max(r2 - (low_x - xc) ** 2, 0.0))
        valid = low_y >= floor[i] - 1e-6
    if not valid:
        return np.inf, True, -1, xc, yc, r, np.nan
    # Family (family.classify).
    under = _below_base(xc, yc, r2, 0.0) and _below_base(xc, yc, r2, big_l) and xn >= big_l
    low_x = min(max(xc, 0.0), min(big_l, xn))
    dips = yc - math.sqrt(max(r2 - (low_x - xc) ** 2, 0.0)) < -1e-6
    cls = 1 if under else (0 if (xn >= big_l - 1e-9 or dips) else -2)
    # Slices (geometry.make_slices) and the sums Bishop needs.
    face = min(max(0.0, xe), xn)
    back = min(max(big_l, xe), xn)
    inv_r = 1.0 / r
    drive_sum = 0.0
    kh_sum = 0.0
    resist = 0.0
    k = 0
    piece = 0  # the ground piece under the slice: slices run from the front backwards
    last_piece = gx.shape[1] - 2
    for z in range(3):
        lo = xe if z == 0 else (face if z == 1 else back)
        width = max((face if z == 0 else (back if z == 1 else xn)) - lo, 0.0)
        b = width / counts[z]
        for _ in range(counts[z]):
            x = lo + fracs[k] * width
            while piece < last_piece and x > gx[i, piece + 1]:
                piece += 1
            x0 = gx[i, piece]
            span = gx[i, piece + 1] - x0
            if span > 0:
                t = max((x - x0) / span, 0.0)
                top = gy[i, piece] + t * (gy[i, piece + 1] - gy[i, piece])
            else:
                top = gy[i, piece + 1]
            dx = x - xc
            inside = r2 - dx * dx
            root = math.sqrt(max(inside, 0.0))
            base = yc - root if inside >= 0.0 else top
            if math.isnan(base):
                base = top
            base = min(base, top)
            front = x < 0
            mid = 0 if front else (1 if x < big_l else 2)
            below = max(min(top, 0.0) - base, 0.0)
            middle = max(min(top, h) - max(base, 0.0), 0.0)
            above = max(top - max(base, h), 0.0)
            g_top = gamma[i, 0] if front else gamma[i, 2]
            w = b * (gamma[i, 0] * below + gamma[i, mid] * middle + g_top * above)
            w = w + b * (0.0 if front else surcharge[i])
            where = 0 if (base < 0 or front) else mid
            cs, ts = coh[i, where], tphi[i, where]
            # cos = sqrt(r^2 - dx^2) / r: the root the base needed, not a second one
            sin_a = min(max(dx * inv_r, -1.0), 1.0)
            cos_a = root * inv_r
            pore = WATER * max(min(water[i], top) - base, 0.0)
            drive_sum += w * sin_a
            kh_sum += w * (yc - 0.5 * (base + top))
            cg = max(cos_a, 1e-9)
            b_cg = b / cg
            normal = max(w * cg - pore * b_cg, 0.0)
            resist += cs * b_cg + normal * ts
            work[0, k] = r * (cs * b + max(w - pore * b, 0.0) * ts)
            work[1, k] = sin_a * ts
            work[2, k] = 0.2 if ts > 0 else 1e-9
            work[3, k] = cos_a
            k += 1
    # Reinforcement moment (geometry.reinforcement_moment).
    restoring = 0.0
    for m in range(lv.shape[1]):
        if not lmask[i, m]:
            continue
        y = lv[i, m]
        reach = r2 - (y - yc) ** 2
        if not (reach > 0 and y < yc):
            continue
        sr = math.sqrt(reach)
        x_cut = xc + sr
        if not (CUT < x_cut < big_l and xe + CUT < x_cut < xn):  # geometry.CUT_TOLERANCE_M
            continue
        p = lpull[i, m]
        hold = lfront[i, m] if xc - sr <= 0.0 else 0.0
        force = min(lrup[i, m], min(p * (big_l - x_cut), p * (x_cut - max(0.0, xc - sr)) + hold))
        restoring += max(force, 0.0) * (r if ltan[i, m] else yc - y)
    # Bishop's simplified method from the ordinary value (bishop.bishop_factor).
    drive = r * drive_sum + kh_i * kh_sum
    if not drive > 1e-9:
        return np.inf, True, cls, xc, yc, r, drive  # no driving moment: F = inf, converged
    f = (r * resist + restoring) / drive
    f = f if math.isfinite(f) and f > 0 else 1.0
    done = False
    for _ in range(max_it):
        total = 0.0
        inv = 1.0 / max(f, 1e-9)
        for q in range(k):
            total += work[0, q] / max(work[3, q] + work[1, q] * inv, work[2, q])
        new = max((total + restoring) / drive, 0.0)
        step = abs(new - f)
        f = new
        if not step >= tol:
            done = True
            break
    return (f if cls >= 0 else np.inf), done, cls, xc, yc, r, drive


def _row(sec, soil, lay, i, pts, skip, counts, fracs, kh_i, tol, max_it, work, out_f, out_ok,
         out_cls, out_geo):  # fmt: skip
    """Every circle ``pts`` (c, 3) of segment i not marked in ``skip`` (c,): the one place the
    circle function is called, so the compiled code holds one copy of it."""
    for j in range(pts.shape[0]):
        if skip[j]:
            out_f[j], out_ok[j], out_cls[j] = np.inf, True, -1
            continue
        f, ok, cls, xc, yc, r, drive = _circle(
            sec, soil, lay, i, pts[j, 0], pts[j, 1], pts[j, 2], counts, fracs, kh_i, tol,
            max_it, work,
        )  # fmt: skip
        out_f[j], out_ok[j], out_cls[j] = f, ok, cls
        out_geo[j, 0], out_geo[j, 1], out_geo[j, 2], out_geo[j, 3] = xc, yc, r, drive


def _circles(sec, soil, lay, params, counts, kh, tol, max_it, out_f, out_ok, out_cls, out_geo):
    """Every circle ``params`` (n, c, 3) of every segment into the (n, c[, 4]) outputs."""
    fracs = _fractions(counts)
    work = np.empty((4, fracs.shape[0]))
    skip = np.zeros(params.shape[1], dtype=np.bool_)
    for i in range(params.shape[0]):
        _row(
            sec, soil, lay, i, params[i], skip, counts, fracs, kh[i], tol, max_it, work,
            out_f[i], out_ok[i], out_cls[i], out_geo[i],
        )  # fmt: skip


_HAS_NUMBA = importlib.util.find_spec("numba") is not None


def available() -> bool:
    """True when the compiled kernel may be used (numba installed and :data:`ENABLED`)."""
    return ENABLED and _HAS_NUMBA


def _f64(a):
    return np.ascontiguousarray(a, dtype=np.float64)


def pack(section, soils, layers) -> tuple:
    """The kernel's arguments for a section, its soils and layers (geometry dataclasses)."""
    n = section.height_m.shape[0]
    floor = section.floor_m if section.floor_m is not None else np.full(n, -np.inf)
    tangent = layers.tangent if layers.tangent is not None else np.zeros_like(layers.mask)
    sec = (
        _f64(section.ground_x_m), _f64(section.ground_y_m), _f64(section.height_m),
        _f64(section.length_m), _f64(section.water_level_m), _f64(section.surcharge_kpa),
        _f64(floor),
    )  # fmt: skip
    soil = (_f64(soils.unit_weight_kn_m3), _f64(soils.cohesion_kpa), _f64(soils.tan_phi))
    lay = (
        _f64(layers.level_m), np.ascontiguousarray(layers.mask, dtype=np.bool_),
        _f64(layers.rupture_kn_m), _f64(layers.pullout_kn_m2), _f64(layers.front_kn_m),
        np.ascontiguousarray(tangent, dtype=np.bool_),
    )  # fmt: skip
    return sec, soil, lay


def _refine(
    sec, soil, lay, counts, kh, tol, max_it, bounds, angles, bp, bf, steps, family, moves,
    overlap, index, rounds, fam_f, fam_p, settle,
):  # fmt: skip
    exit_min, exit_max, entry_min, entry_max = bounds
    fracs = _fractions(counts)
    work = np.empty((4, fracs.shape[0]))
    k, n_moves = bp.shape[1], moves.shape[0]
    cand = np.empty((k, n_moves, 3))
    raw = np.empty((k, n_moves, 3))
    cf = np.empty((k, n_moves))
    ccls = np.empty((k, n_moves), dtype=np.int64)
    skip = np.empty(n_moves, dtype=np.bool_)
    cok = np.empty(n_moves, dtype=np.bool_)
    cgeo = np.empty((n_moves, 4))
    last = np.empty(k, dtype=np.int64)
    unclipped = np.zeros(k, dtype=np.bool_)
    # Every point a segment's starts have evaluated, by its exact bits: starts that meet
    # (a free start and a family's own, two starts in one basin) evaluate the same points
    # again with other histories; the same point gives the same bits, so it is looked up.
    size = 16
    while size < 2 * rounds * k * n_moves:
        size *= 2
    seen_key = np.empty((size, 3), dtype=np.int64)
    seen_f = np.empty(size)
    seen_cls = np.empty(size, dtype=np.int64)
    seen_row = np.full(size, -1, dtype=np.int64)
    bits = cand.view(np.int64)
    slot = np.empty(n_moves, dtype=np.int64)
    cached = np.empty(n_moves, dtype=np.bool_)
    skip_or_cached = np.empty(n_moves, dtype=np.bool_)
    for i in range(bp.shape[0]):
        last[:] = -1
        for _ in range(rounds):
            # Candidates, clipped as search._clip_params does.
            for s in range(k):
                for m in range(n_moves):
                    for d in range(3):
                        raw[s, m, d] = bp[i, s, d] + moves[m, d] * steps[i, s, d]
                    e = min(max(raw[s, m, 0], exit_min[i]), exit_max[i])
                    n_lo = max(entry_min[i], e + 1e-3)
                    cand[s, m, 0] = e
                    cand[s, m, 1] = min(max(raw[s, m, 1], n_lo), max(entry_max[i], n_lo))
                    cand[s, m, 2] = min(max(raw[s, m, 2], angles[0]), angles[1])
            # Points already known are skipped (search._known), the others evaluated; a start
            # that stands where an earlier one stands, with the same steps, has the same
            # candidates, so their values are copied (a free start and a family's own
            # often begin on the same grid circle and never part).
            for s in range(k):
                twin = -1
                for t in range(s):
                    same = last[t] == last[s] and unclipped[t] == unclipped[s]
                    for d in range(3):
                        same = same and bp[i, t, d] == bp[i, s, d]
                        same = same and steps[i, t, d] == steps[i, s, d]
                    if same:
                        twin = t
                        break
                if twin >= 0:
                    for m in range(n_moves):
                        cf[s, m], ccls[s, m] = cf[twin, m], ccls[twin, m]
                    continue
                for m in range(n_moves):
                    code = 0
                    centre = True
                    for d in range(3):
                        at = cand[s, m, d] == bp[i, s, d]
                        centre = centre and at
                        code = code * 3 + (1 if at else int(moves[m, d]) + 1)
                    known = centre
                    partner = index[code]
                    if not known and partner >= 0 and partner != m:
                        known = (
                            cand[s, partner, 0] == cand[s, m, 0]
                            and cand[s, partner, 1] == cand[s, m, 1]
                            and cand[s, partner, 2] == cand[s, m, 2]
                        )
                    if last[s] >= 0 and overlap[last[s], m] and unclipped[s]:
                        known = True
                    skip[m] = known
                    cached[m] = False
                    if not known:
                        b0, b1, b2 = bits[s, m, 0], bits[s, m, 1], bits[s, m, 2]
                        h = (b0 ^ (b0 >> 29) ^ (b1 >> 5) ^ (b1 >> 33) ^ (b2 >> 11)) & (size - 1)
                        while seen_row[h] == i:
                            if (
                                seen_key[h, 0] == b0
                                and seen_key[h, 1] == b1
                                and seen_key[h, 2] == b2
                            ):
                                cached[m] = True
                                break
                            h = (h + 1) & (size - 1)
                        slot[m] = h
                    skip_or_cached[m] = known or cached[m]
                _row(
                    sec, soil, lay, i, cand[s], skip_or_cached, counts, fracs, kh[i], tol,
                    max_it, work, cf[s], cok, ccls[s], cgeo,
                )  # fmt: skip
                for m in range(n_moves):
                    if cached[m]:
                        cf[s, m], ccls[s, m] = seen_f[slot[m]], seen_cls[slot[m]]
                        continue
                    cf[s, m] = np.rint(cf[s, m] * settle) / settle  # search.settled
                    if not skip[m]:
                        h = slot[m]
                        seen_row[h], seen_f[h], seen_cls[h] = i, cf[s, m], ccls[s, m]
                        for d in range(3):
                            seen_key[h, d] = bits[s, m, d]
            # Each family's best so far (search._keep_family_best: the first of the least).
            for s in range(k):
                for m in range(n_moves):
                    c = ccls[s, m]
                    if c >= 0 and cf[s, m] < fam_f[i, c]:
                        fam_f[i, c] = cf[s, m]
                        for d in range(3):
                            fam_p[i, c, d] = cand[s, m, d]
            # Each start moves to its best neighbour of its family, or halves its steps.
            for s in range(k):
                best, j = np.inf, 0
                for m in range(n_moves):
                    mine = family[s] == -1 or ccls[s, m] == family[s]
                    if mine and cf[s, m] < best:
                        best, j = cf[s, m], m
                unclipped[s] = (
                    cand[s, j, 0] == raw[s, j, 0]
                    and cand[s, j, 1] == raw[s, j, 1]
                    and cand[s, j, 2] == raw[s, j, 2]
                )
                if math.isfinite(best) and best < bf[i, s] - 1e-6:
                    for d in range(3):
                        bp[i, s, d] = cand[s, j, d]
                    bf[i, s] = best
                    last[s] = j
                else:
                    for d in range(3):
                        steps[i, s, d] = 0.5 * steps[i, s, d]
                    last[s] = -1
