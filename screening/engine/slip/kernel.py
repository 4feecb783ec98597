"""One compiled pass per trial circle: circle, validity, family, slices, reinforcement moment
and Bishop's iteration (METHOD section 6), instead of (segments x circles x slices) arrays.

The numbers are those of :mod:`screening.engine.slip.geometry`, :mod:`.family` and
:mod:`.bishop`, rule for rule (tests/unit/test_slip_kernel.py compares them circle by
circle); only the order of the sums over slices differs, so a factor agrees to about 1e-12.
The kernel always works in double precision.

numba is optional: without it (or with :data:`ENABLED` set False) :func:`available` is False
and the search uses the numpy path. The compiled code is cached on disk by numba
(``cache=True``), so only the first run on a machine pays for the compilation (a few seconds,
bench/bench_speed.py prints it); :func:`warm_up` compiles or loads it on purpose.
"""

from __future__ import annotations

import importlib.util
import math

import numpy as np

ENABLED = True
"""Set False to force the numpy path (tests and the benchmark compare the two)."""
WATER = 9.81
"""Unit weight of water, kN/m3 (the same value as geometry.WATER_UNIT_WEIGHT_KN_M3)."""
_READY = False


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


def _circles(
    gx, gy, height, length, water, surcharge, floor, gamma, coh, tphi,
    lv, lmask, lrup, lpull, lfront, ltan, params, counts, kh, tol, max_it,
    out_f, out_ok, out_cls, out_geo,
):  # fmt: skip
    n, c = params.shape[0], params.shape[1]
    s_total = counts[0] + counts[1] + counts[2]
    top_s = np.empty(s_total)
    slope_s = np.empty(s_total)
    floor_s = np.empty(s_total)
    cos_s = np.empty(s_total)
    lo = np.empty(3)
    width = np.empty(3)
    m_layers = lv.shape[1]
    last_piece = gx.shape[1] - 2
    fracs = np.empty(s_total)
    k = 0
    for z in range(3):
        for q in range(counts[z]):
            fracs[k] = (q + 0.5) / counts[z]
            k += 1
    for i in range(n):
        big_l, h = length[i], height[i]
        for j in range(c):
            xe, xn, ang = params[i, j, 0], params[i, j, 1], params[i, j, 2]
            out_f[i, j] = np.inf
            out_ok[i, j] = True
            out_cls[i, j] = -1
            out_geo[i, j, 0] = np.nan
            out_geo[i, j, 1] = np.nan
            out_geo[i, j, 2] = np.nan
            if not (math.isfinite(xe) and math.isfinite(xn) and math.isfinite(ang)):
                continue
            # The circle through the two ground points (geometry.make_circles).
            ye, yn = _ground(gx, gy, i, xe), _ground(gx, gy, i, xn)
            vx, vy = xn - xe, yn - ye
            chord = math.hypot(vx, vy)
            safe = chord if chord > 1e-9 else 1.0
            half = min(max(ang, 1e-3), math.pi - 1e-3) / 2
            offset = 0.5 * safe / math.tan(half)
            xc = 0.5 * (xe + xn) - vy / safe * offset
            yc = 0.5 * (ye + yn) + vx / safe * offset
            r = 0.5 * safe / math.sin(half)
            r2 = r * r
            out_geo[i, j, 0], out_geo[i, j, 1], out_geo[i, j, 2] = xc, yc, r
            valid = vx > 1e-6 and yc >= max(ye, yn) - 1e-9
            valid = valid and math.isfinite(xc) and math.isfinite(yc)
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
                continue
            # Family (family.classify).
            zero_l = 0.0
            under = _below_base(xc, yc, r2, zero_l) and _below_base(xc, yc, r2, big_l)
            under = under and xn >= big_l
            low_x = min(max(xc, 0.0), min(big_l, xn))
            dips = yc - math.sqrt(max(r2 - (low_x - xc) ** 2, 0.0)) < -1e-6
            cls = 1 if under else (0 if (xn >= big_l - 1e-9 or dips) else -2)
            out_cls[i, j] = cls
            # Slices (geometry.make_slices) and the sums Bishop needs.
            face = min(max(0.0, xe), xn)
            back = min(max(big_l, xe), xn)
            lo[0], lo[1], lo[2] = xe, face, back
            width[0], width[1], width[2] = max(face - xe, 0.0), max(back - face, 0.0), 0.0
            width[2] = max(xn - back, 0.0)
            drive_sum = 0.0
            kh_sum = 0.0
            resist = 0.0
            k = 0
            piece = 0  # the ground piece under the slice: slices run from the front backwards
            for z in range(3):
                cz = counts[z]
                b = width[z] / cz
                for _ in range(cz):
                    x = lo[z] + fracs[k] * width[z]
                    while piece < last_piece and x > gx[i, piece + 1]:
                        piece += 1
                    x0 = gx[i, piece]
                    span = gx[i, piece + 1] - x0
                    if span > 0:
                        t = max((x - x0) / span, 0.0)
                        top = gy[i, piece] + t * (gy[i, piece + 1] - gy[i, piece])
                    else:
                        top = gy[i, piece + 1]
                    inside = r2 - (x - xc) ** 2
                    base = yc - math.sqrt(inside) if inside >= 0.0 else top
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
                    soil = 0 if (base < 0 or front) else mid
                    cs, ts = coh[i, soil], tphi[i, soil]
                    sin_a = min(max((x - xc) / r, -1.0), 1.0)
                    cos_a = math.sqrt(1.0 - sin_a * sin_a)
                    pore = WATER * max(min(water[i], top) - base, 0.0)
                    drive_sum += w * sin_a
                    kh_sum += w * (yc - 0.5 * (base + top))
                    cg = max(cos_a, 1e-9)
                    b_cg = b / cg
                    normal = max(w * cg - pore * b_cg, 0.0)
                    resist += cs * b_cg + normal * ts
                    top_s[k] = r * (cs * b + max(w - pore * b, 0.0) * ts)
                    slope_s[k] = sin_a * ts
                    floor_s[k] = 0.2 if ts > 0 else 1e-9
                    cos_s[k] = cos_a
                    k += 1
            # Reinforcement moment (geometry.reinforcement_moment).
            restoring = 0.0
            for m in range(m_layers):
                if not lmask[i, m]:
                    continue
                y = lv[i, m]
                reach = r2 - (y - yc) ** 2
                sr = math.sqrt(max(reach, 0.0))
                x_cut = xc + sr
                if not (reach > 0 and y < yc and 0 < x_cut < big_l and xe < x_cut < xn):
                    continue
                p = lpull[i, m]
                hold = lfront[i, m] if xc - sr <= 0.0 else 0.0
                force = min(
                    lrup[i, m], min(p * (big_l - x_cut), p * (x_cut - max(0.0, xc - sr)) + hold)
                )
                restoring += max(force, 0.0) * (r if ltan[i, m] else yc - y)
            # Bishop's simplified method from the ordinary value (bishop.bishop_factor).
            drive = r * drive_sum + kh[i] * kh_sum
            if not drive > 1e-9:
                continue  # no driving moment: F = inf, converged
            f = (r * resist + restoring) / drive
            if not (math.isfinite(f) and f > 0):
                f = 1.0
            done = False
            for _ in range(max_it):
                total = 0.0
                inv = 1.0 / max(f, 1e-9)
                for q in range(s_total):
                    total += top_s[q] / max(cos_s[q] + slope_s[q] * inv, floor_s[q])
                new = max((total + restoring) / drive, 0.0)
                step = abs(new - f)
                f = new
                if not step >= tol:
                    done = True
                    break
            out_f[i, j] = f if cls >= 0 else np.inf
            out_ok[i, j] = done


_compiled = None
_HAS_NUMBA = importlib.util.find_spec("numba") is not None


def _kernel():
    """The compiled ``_circles`` (numba imported on first use: it costs half a second)."""
    global _compiled
    if _compiled is None:
        import numba

        jit = numba.njit(
            cache=True,
            nogil=True,
            error_model="numpy",
            fastmath={"reassoc", "contract", "arcp", "nsz"},
        )
        for name in ("_ground", "_below_base"):
            globals()[name] = jit(globals()[name])
        _compiled = jit(_circles)
    return _compiled


def available() -> bool:
    """True when the compiled kernel can be used (numba installed and :data:`ENABLED`)."""
    return ENABLED and _HAS_NUMBA


def warm_up() -> float:
    """Compile the kernel, or load it from numba's cache; seconds it took (0 when ready)."""
    global _READY
    if not available() or _READY:
        return 0.0
    import time

    start = time.perf_counter()
    one = np.zeros((1, 1))
    params = np.array([[[-1.0, 2.0, 1.0]]])
    evaluate_circles(
        np.array([[-10.0, 0.0, 0.0, 10.0]]), np.array([[0.5, 0.5, 3.0, 3.0]]),
        np.full(1, 3.0), np.full(1, 2.0), np.full(1, -np.inf), np.zeros(1), np.full(1, -6.0),
        np.full((1, 3), 19.0), np.zeros((1, 3)), np.full((1, 3), 0.6),
        one, np.ones((1, 1), dtype=bool), one, one, one, np.zeros((1, 1), dtype=bool),
        params, (6, 12, 10), np.zeros(1), 1e-4, 60,
    )  # fmt: skip
    _READY = True
    return time.perf_counter() - start


def evaluate_circles(
    gx, gy, height, length, water, surcharge, floor, gamma, coh, tphi,
    lv, lmask, lrup, lpull, lfront, ltan, params, counts, kh, tol, max_it,
):  # fmt: skip
    """Factor (n, c; inf where invalid, internal or not driving), convergence (n, c), family
    (n, c; -1 invalid, -2 internal) and centre x, y and radius (n, c, 3) of every circle."""
    n, c = params.shape[0], params.shape[1]
    out_f = np.empty((n, c))
    out_ok = np.empty((n, c), dtype=np.bool_)
    out_cls = np.empty((n, c), dtype=np.int64)
    out_geo = np.empty((n, c, 3))
    f64 = lambda a: np.ascontiguousarray(a, dtype=np.float64)  # noqa: E731
    flag = lambda a: np.ascontiguousarray(a, dtype=np.bool_)  # noqa: E731
    _kernel()(
        f64(gx), f64(gy), f64(height), f64(length), f64(water), f64(surcharge), f64(floor),
        f64(gamma), f64(coh), f64(tphi), f64(lv), flag(lmask), f64(lrup), f64(lpull),
        f64(lfront), flag(ltan), f64(params), np.asarray(counts, dtype=np.int64), f64(kh),
        float(tol), int(max_it), out_f, out_ok, out_cls, out_geo,
    )  # fmt: skip
    return out_f, out_ok, out_cls, out_geo
