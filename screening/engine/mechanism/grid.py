"""Nodes on a graded grid and the candidate discontinuities between them (DLO).

Nodes sit on columns (x) and rows (y). Both axes are graded: the spacing is ``spacing_m``
inside the refinement box and grows by ``grading`` per metre of distance from it. Required
columns (geometry vertices, load and footing edges) and rows (interfaces, crest) are always
there; a reinforcement layer is never a row: rows are generated around it so that every layer
lies strictly between two rows (a line cannot end on a layer and dodge it). A column meets the
ground in a surface node; rows closer than a third of their spacing below it are dropped.

A candidate line joins two nodes, lies inside the soil of one material (a line along an
interface lies in both, and is offered once per material so the LP takes the weaker one for
its own jump), does not run along the free ground surface, and is *primitive*: no other node
lies on it, so no two candidates overlap [pub, Smith & Gilbert 2007, section 3].
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from screening.engine.mechanism.problem import TOL_M, Problem, ground_level

DROP_BELOW_SURFACE = 0.35
"""A row closer below the ground than this share of its spacing gets no node there."""
INITIAL_REACH = 1
"""First LP: lines to nodes at most this many columns and rows away (adaptive start)."""


@dataclass(frozen=True)
class Nodes:
    """Node coordinates (n,), their column and row index, and whether they are free (on the
    ground surface: no compatibility condition, the outside is empty)."""

    x_m: np.ndarray
    y_m: np.ndarray
    column: np.ndarray
    row: np.ndarray
    free: np.ndarray
    columns_m: np.ndarray
    rows_m: np.ndarray

    @property
    def n(self) -> int:
        return int(self.x_m.shape[0])


@dataclass(frozen=True)
class Lines:
    """Candidate lines, one entry per (line, material) pair, node ``a`` left of ``b`` (or
    below it on a vertical line). ``geometry`` numbers the distinct segments."""

    a: np.ndarray
    b: np.ndarray
    geometry: np.ndarray
    material: np.ndarray
    length_m: np.ndarray
    cos: np.ndarray
    sin: np.ndarray
    initial: np.ndarray

    @property
    def n(self) -> int:
        return int(self.a.shape[0])


def _axis(lo, hi, required, box, spacing, grading, avoid=(), focus=(), ratio=1.0) -> np.ndarray:
    """Graded coordinates from lo to hi through every required value, none on an avoid value;
    ``ratio`` times finer at the ``focus`` values, back to the box spacing within ~2 spacings."""
    req = np.unique(np.clip(np.array([lo, hi, *required], dtype=np.float64), lo, hi))
    avoid = np.asarray(sorted(avoid), dtype=np.float64)
    out = [req]
    for a, b in zip(req[:-1], req[1:], strict=True):
        inner = avoid[(avoid > a + TOL_M) & (avoid < b - TOL_M)]
        cuts = np.concatenate([[a], inner, [b]])
        for u, w in zip(cuts[:-1], cuts[1:], strict=True):
            t = np.linspace(u, w, 65)
            dist = np.maximum(np.maximum(box[0] - t, t - box[1]), 0.0)
            h = spacing + grading * dist
            for f in focus:
                h = np.minimum(h, ratio * spacing + 0.5 * np.abs(t - f))
            s = np.concatenate([[0.0], np.cumsum(np.diff(t) / (0.5 * (h[1:] + h[:-1])))])
            cells = max(1, round(s[-1]))
            if cells > 1:
                out.append(np.interp(np.arange(1, cells) * s[-1] / cells, s, t))
    return np.unique(np.concatenate(out))


def make_nodes(problem: Problem, spacing_m: float) -> Nodes:
    """Nodes of the graded grid for a fine spacing (module docstring)."""
    r = problem.refinement
    lo, hi = problem.x_range_m
    base = problem.base_m
    top = float(np.max(ground_level(problem, problem.breaks_m)))
    cols = _axis(
        lo,
        hi,
        [*problem.breaks_m, *r.columns_m],
        (r.x0_m, r.x1_m),
        spacing_m,
        r.grading,
        focus=r.focus_columns_m,
        ratio=r.focus_ratio,
    )
    layer_levels = [lay.level_m for lay in problem.layers]
    rows = _axis(
        base,
        top,
        [*r.rows_m],
        (r.y0_m, r.y1_m),
        spacing_m,
        r.grading,
        avoid=layer_levels,
        focus=r.focus_rows_m,
        ratio=r.focus_ratio,
    )
    ground = ground_level(problem, cols)
    low_ground = np.minimum(ground_level(problem, cols, -1), ground_level(problem, cols, 1))
    xs, ys, ci, ri, free = [], [], [], [], []
    for c, x in enumerate(cols):
        local = [y for (x0, x1, y) in r.local_rows if x0 - TOL_M <= x <= x1 + TOL_M]
        here = np.unique(np.concatenate([rows, np.array(local, dtype=np.float64)]))
        g = ground[c]
        below = here[here < g - TOL_M]
        gaps = np.diff(np.concatenate([[below[0]], below])) if below.size else below
        keep = (g - below >= DROP_BELOW_SURFACE * np.maximum(gaps, TOL_M)) | (gaps == 0)
        column_y = np.concatenate([below[keep], [g]])
        xs.append(np.full(column_y.shape, x))
        ys.append(column_y)
        ci.append(np.full(column_y.shape, c))
        ri.append(np.clip(np.searchsorted(rows, column_y - 1e-9), 0, rows.size - 1))
        on_surface = column_y >= low_ground[c] - TOL_M
        free.append(on_surface)
    x = np.concatenate(xs)
    y = np.concatenate(ys)
    is_free = np.concatenate(free)
    f = problem.footing
    if f is not None:
        under = (x > f.x0_m + TOL_M) & (x < f.x1_m - TOL_M)
        is_free &= ~under
    keep = np.ones(x.shape, dtype=bool)
    for xf, y0, y1 in problem.held_faces:
        keep &= ~((np.abs(x - xf) <= TOL_M) & (y > y0 + TOL_M) & (y < y1 - TOL_M))
    ci, ri = np.concatenate(ci)[keep], np.concatenate(ri)[keep]
    return Nodes(x[keep], y[keep], ci, ri, is_free[keep], cols, rows)


def nodes_for_count(problem: Problem, target: int, rounds: int = 8) -> Nodes:
    """Nodes with a fine spacing chosen so that their number is close to ``target``."""
    r = problem.refinement
    area = max((r.x1_m - r.x0_m) * (r.y1_m - r.y0_m), 1e-6)
    spacing = float(np.sqrt(area / max(target, 4)))
    best = make_nodes(problem, spacing)
    for _ in range(rounds):
        if abs(best.n - target) <= 0.05 * target:
            break
        spacing *= (best.n / target) ** 0.5
        best = make_nodes(problem, spacing)
    return best


def _interval_bounds(problem: Problem):
    """Per material and x-interval of band edges: bottom and top at both ends, (m, k, 2)."""
    xs = problem.breaks_m
    m = len(problem.materials)
    k = xs.size - 1
    bot = np.full((m, k, 2), 1e30)
    top = np.full((m, k, 2), -1e30)
    for band in problem.bands:
        inside = (xs[:-1] >= band.x0_m - TOL_M) & (xs[1:] <= band.x1_m + TOL_M)
        for j in np.flatnonzero(inside):
            ends = np.array([xs[j], xs[j + 1]])
            w = (ends - band.x0_m) / (band.x1_m - band.x0_m)
            bot[band.material, j] = band.bottom0_m + (band.bottom1_m - band.bottom0_m) * w
            top[band.material, j] = band.top0_m + (band.top1_m - band.top0_m) * w
    return xs, bot, top


def containment(problem: Problem, xa, ya, xb, yb) -> np.ndarray:
    """(p, m) True where the closed segment lies inside material m (xa <= xb)."""
    xs, bot, top = _interval_bounds(problem)
    tol = 1e-6
    vertical = xb - xa <= TOL_M
    x0 = np.maximum(xa[:, None], xs[None, :-1])
    x1 = np.minimum(xb[:, None], xs[None, 1:])
    span = np.where(vertical, 1.0, xb - xa)[:, None]
    slope = np.where(vertical, 0.0, (yb - ya))[:, None] / span
    valid = (x1 - x0 > TOL_M) & ~vertical[:, None]
    width = (xs[1:] - xs[:-1])[None, :]
    ok = np.ones((xa.size, bot.shape[0]), dtype=bool)
    for end in (x0, x1):
        y = ya[:, None] + slope * (end - xa[:, None])
        w = (end - xs[None, :-1]) / width
        lo = bot[:, :, 0][None] + (bot[:, :, 1] - bot[:, :, 0])[None] * w[:, None, :]
        hi = top[:, :, 0][None] + (top[:, :, 1] - top[:, :, 0])[None] * w[:, None, :]
        inside = (y[:, None, :] >= lo - tol) & (y[:, None, :] <= hi + tol)
        ok &= np.all(inside | ~valid[:, None, :], axis=2)
    # vertical segments: the interval on either side of their x must hold them
    v = np.flatnonzero(vertical)
    if v.size:
        xv = xa[v]
        yl, yh = np.minimum(ya[v], yb[v]), np.maximum(ya[v], yb[v])
        right = np.clip(np.searchsorted(xs, xv, side="right") - 1, 0, xs.size - 2)
        on_edge = np.abs(xs[right] - xv) <= TOL_M
        left = np.where(on_edge & (right > 0), right - 1, right)
        vok = np.zeros((v.size, bot.shape[0]), dtype=bool)
        for jc in (left, right):
            w = np.clip((xv - xs[jc]) / (xs[jc + 1] - xs[jc]), 0.0, 1.0)
            lo = bot[:, jc, 0] + (bot[:, jc, 1] - bot[:, jc, 0]) * w
            hi = top[:, jc, 0] + (top[:, jc, 1] - top[:, jc, 0]) * w
            vok |= ((yl[None] >= lo - tol) & (yh[None] <= hi + tol)).T
        ok[v] = vok
    return ok


def _along_free_surface(problem: Problem, nodes: Nodes, a, b) -> np.ndarray:
    out = nodes.free[a] & nodes.free[b]
    both = np.flatnonzero(out)
    a, b = a[both], b[both]
    xm = 0.5 * (nodes.x_m[a] + nodes.x_m[b])
    ym = 0.5 * (nodes.y_m[a] + nodes.y_m[b])
    vertical = nodes.x_m[b] - nodes.x_m[a] <= TOL_M
    hi = ground_level(problem, xm)
    lo = np.minimum(ground_level(problem, xm, -1), ground_level(problem, xm, 1))
    on_top = np.abs(ym - hi) <= 1e-6
    on_step = vertical & (ym >= lo - 1e-6) & (ym <= hi + 1e-6) & (hi - lo > 1e-6)
    out[both] = on_top | on_step
    return out


def _primitive(nodes: Nodes, a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """True where no node other than the ends lies on the segment."""
    x, y, col = nodes.x_m, nodes.y_m, nodes.column
    span_y = float(y.max() - y.min()) + 10.0
    keys = col * span_y + (y - y.min())
    order = np.argsort(keys, kind="stable")
    sorted_keys = keys[order]
    rank = np.empty(nodes.n, dtype=np.int64)
    rank[order] = np.arange(nodes.n)
    out = np.ones(a.size, dtype=bool)
    vertical = col[a] == col[b]
    out[vertical] = np.abs(rank[b[vertical]] - rank[a[vertical]]) == 1
    # a node between the ends sits on a column strictly between theirs: test those columns
    # only, one (line, column) pair each
    nv = np.flatnonzero(~vertical & (np.abs(col[b] - col[a]) >= 2))
    if nv.size == 0:
        return out
    ca, cb = col[a[nv]], col[b[nv]]
    gaps = cb - ca - 1
    which = np.repeat(np.arange(nv.size), gaps)
    c = ca[which] + 1 + np.arange(which.size) - np.repeat(np.cumsum(gaps) - gaps, gaps)
    xa, ya = x[a[nv]][which], y[a[nv]][which]
    xb, yb = x[b[nv]][which], y[b[nv]][which]
    yq = ya + (nodes.columns_m[c] - xa) * (yb - ya) / (xb - xa)
    q = c * span_y + (yq - y.min())
    idx = np.clip(np.searchsorted(sorted_keys, q), 1, nodes.n - 1)
    near = np.minimum(np.abs(sorted_keys[idx] - q), np.abs(sorted_keys[idx - 1] - q))
    out[nv] = np.bincount(which, weights=near <= 1e-6, minlength=nv.size) == 0
    return out


def candidate_lines(problem: Problem, nodes: Nodes) -> Lines:
    """Every admissible primitive line, once per material it lies in (module docstring)."""
    i, j = np.triu_indices(nodes.n, k=1)
    x, y = nodes.x_m, nodes.y_m
    swap = (x[j] < x[i] - TOL_M) | ((np.abs(x[j] - x[i]) <= TOL_M) & (y[j] < y[i]))
    a = np.where(swap, j, i)
    b = np.where(swap, i, j)
    # a line lies in a material only if both its ends do: test the pairs that share one
    node_in = containment(problem, x, y, x, y)
    common = node_in[a] & node_in[b]
    share = np.flatnonzero(np.any(common, axis=1))
    a, b, common = a[share], b[share], common[share]
    within = containment(problem, x[a], y[a], x[b], y[b]) & common
    keep = np.any(within, axis=1) & ~_along_free_surface(problem, nodes, a, b)
    a, b, within = a[keep], b[keep], within[keep]
    prim = _primitive(nodes, a, b)
    a, b, within = a[prim], b[prim], within[prim]
    line, material = np.nonzero(within)
    a, b = a[line], b[line]
    dx, dy = x[b] - x[a], y[b] - y[a]
    length = np.hypot(dx, dy)
    reach = np.maximum(
        np.abs(nodes.column[b] - nodes.column[a]), np.abs(nodes.row[b] - nodes.row[a])
    )
    return Lines(
        a=a,
        b=b,
        geometry=line,
        material=material,
        length_m=length,
        cos=dx / length,
        sin=dy / length,
        initial=reach <= INITIAL_REACH,
    )
