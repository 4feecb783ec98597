"""Cross-sections, trial circles and slices for the slip-circle search (METHOD section 6).

Coordinates of every segment's cross-section: x in metres from the face of the wall into the
fill (the ground in front is at x < 0), y in metres up from the base of the reinforced zone.
Three soils: the foundation (everything below y = 0 and in front of the face), the reinforced
fill (0 <= x < L, 0 <= y < H) and the retained fill (behind it, and above the wall top).

A trial circle is given by where it leaves the ground in front (x_exit <= 0), where it enters
the ground behind (x_entry > 0) and the angle its arc subtends at the centre; the centre lies
on the perpendicular bisector of that chord, above it. The sliding mass is the soil between the
ground line and the lower arc. A circle is *valid* when both ends lie on the lower half of the
circle and the arc stays under the ground line between them (checked at the ground-line
vertices: the arc is convex and the ground line straight between vertices, so that suffices).

Shapes: ``n`` segments, ``c`` circles per segment, ``s`` slices per circle, ``k`` ground-line
vertices. Everything broadcasts over the leading ``(n, c)`` axes; nothing loops over segments.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from screening.engine.result import FloatArray

WATER_UNIT_WEIGHT_KN_M3 = 9.81
CUT_TOLERANCE_M = 1e-9
"""A layer counts only where the arc crosses it this far inside the face and the exit: a
circle leaving the ground at the toe passes exactly through the ground level there, where a
layer often lies, and rounding alone then decided whether that layer (its whole facing
hold) counted, moving F by 15 % on one demo wall."""
FOUNDATION, REINFORCED, RETAINED = 0, 1, 2
"""Soil index in :class:`SlipSoils` arrays."""


@dataclass(frozen=True)
class SlipSection:
    """Cross-section of ``n`` segments.

    ``ground_x_m``/``ground_y_m`` are ``(n, k)`` polylines with non-decreasing x (a vertical
    step, such as the face, is two vertices with the same x); the first and last vertices lie
    beyond any circle. The ground level at a vertical step is its lower end (left limit).
    """

    ground_x_m: FloatArray
    ground_y_m: FloatArray
    height_m: FloatArray
    """Height of the reinforced zone H (its top is y = H), (n,)."""
    length_m: FloatArray
    """Reinforcement length L (the reinforced zone is 0 <= x < L), (n,)."""
    water_level_m: FloatArray
    """Level y of the water table (negative: below the base), (n,); -inf for none."""
    surcharge_kpa: FloatArray
    """Uniform vertical load on the ground behind the face (x > 0), (n,)."""
    floor_m: FloatArray | None = None
    """Level y of the deepest point a circle may reach (a firm layer or the search's depth
    limit; negative: below the base), (n,); None: no limit."""

    @property
    def n(self) -> int:
        return int(self.height_m.shape[0])


@dataclass(frozen=True)
class SlipSoils:
    """Unit weight and strength of the three soils, each ``(n, 3)`` indexed by FOUNDATION,
    REINFORCED, RETAINED. Undrained soil is given as cohesion = cu and tan_phi = 0."""

    unit_weight_kn_m3: FloatArray
    cohesion_kpa: FloatArray
    tan_phi: FloatArray


@dataclass(frozen=True)
class SlipLayers:
    """Reinforcement layers, ``(n, m)``; ``mask`` False on padding."""

    level_m: FloatArray
    """Height y of the layer above the base of the reinforced zone."""
    mask: np.ndarray
    rupture_kn_m: FloatArray
    """Design tensile strength per metre run of wall."""
    pullout_kn_m2: FloatArray
    """Pullout resistance per metre of embedded length, per metre run (F*.alpha.sigma'v.C.Rc)."""
    front_kn_m: FloatArray
    """Extra hold of the part in front of the circle besides its own pullout (facing
    connection), per metre run; 0 for a face with no structural facing."""
    tangent: np.ndarray | None = None
    """True where the layer's force acts along the circle (continuous extensible sheets:
    lever arm R); False or None: horizontal (lever arm = vertical distance to the centre)."""

    @classmethod
    def none(cls, n: int) -> SlipLayers:
        """No reinforcement (unreinforced slopes, tests against slope benchmarks)."""
        z = np.zeros((n, 1))
        return cls(z, np.zeros((n, 1), dtype=bool), z, z, z, np.zeros((n, 1), dtype=bool))


@dataclass(frozen=True)
class Circles:
    """Trial circles, every array ``(n, c)``."""

    x_exit_m: FloatArray
    x_entry_m: FloatArray
    y_exit_m: FloatArray
    y_entry_m: FloatArray
    centre_x_m: FloatArray
    centre_y_m: FloatArray
    radius_m: FloatArray
    valid: np.ndarray


@dataclass(frozen=True)
class Slices:
    """Slices of every circle, arrays ``(n, c, s)``."""

    width_m: FloatArray
    x_m: FloatArray
    base_y_m: FloatArray
    top_y_m: FloatArray
    weight_kn: FloatArray
    """Soil weight plus the surcharge on the slice, per metre run."""
    sin_a: FloatArray
    cos_a: FloatArray
    cohesion_kpa: FloatArray
    tan_phi: FloatArray
    pore_kpa: FloatArray


def ground_level(section: SlipSection, x_m: FloatArray) -> FloatArray:
    """Ground level y at ``x_m`` (shape ``(n, ...)``), by the polyline of each segment."""
    gx, gy = section.ground_x_m, section.ground_y_m
    n, k = gx.shape
    flat = x_m.reshape(n, -1)
    # Index of the polyline piece holding each x: the last vertex strictly left of it, as a
    # flat index into the (n, k) vertex arrays (one gather per end instead of take_along_axis).
    piece = np.repeat(np.arange(0, n * k, k, dtype=np.int64)[:, None], flat.shape[1], 1)
    for j in range(1, k - 1):  # the few vertices of one ground line, not the segments
        piece += flat > gx[:, j : j + 1]
    gxf, gyf = gx.ravel(), gy.ravel()
    x0, x1 = gxf[piece], gxf[piece + 1]
    y0, y1 = gyf[piece], gyf[piece + 1]
    span = x1 - x0
    positive = span > 0
    t = np.maximum((flat - x0) / np.where(positive, span, 1.0), 0.0)
    y = np.where(positive, y0 + t * (y1 - y0), y1)
    return y.reshape(x_m.shape)


def arc_level(circles: Circles, x_m: FloatArray) -> FloatArray:
    """y of the lower arc at ``x_m`` (shape ``(n, c, ...)``); NaN outside the circle."""
    extra = (1,) * (x_m.ndim - 2)
    xc = circles.centre_x_m.reshape(circles.centre_x_m.shape + extra)
    yc = circles.centre_y_m.reshape(xc.shape)
    r = circles.radius_m.reshape(xc.shape)
    inside = r**2 - (x_m - xc) ** 2
    return np.where(inside >= 0, yc - np.sqrt(np.maximum(inside, 0)), np.nan)


def make_circles(
    section: SlipSection, x_exit_m: FloatArray, x_entry_m: FloatArray, angle_rad: FloatArray
) -> Circles:
    """Circles through the ground at ``x_exit_m`` and ``x_entry_m`` subtending ``angle_rad``.

    All three inputs are ``(n, c)``. Circles that are not valid (see the module docstring) keep
    finite numbers but ``valid`` is False.
    """
    c = x_exit_m.shape[1]
    ends = ground_level(section, np.concatenate([x_exit_m, x_entry_m], axis=1))
    ye, yn = ends[:, :c], ends[:, c:]
    vx, vy = x_entry_m - x_exit_m, yn - ye
    chord = np.hypot(vx, vy)
    safe_chord = np.where(chord > 1e-9, chord, 1.0)
    half = np.minimum(np.maximum(angle_rad, 1e-3), np.pi - 1e-3) / 2
    offset = 0.5 * safe_chord / np.tan(half)
    xc = 0.5 * (x_exit_m + x_entry_m) - vy / safe_chord * offset
    yc = 0.5 * (ye + yn) + vx / safe_chord * offset
    r = 0.5 * safe_chord / np.sin(half)
    circles = Circles(x_exit_m, x_entry_m, ye, yn, xc, yc, r, np.ones(xc.shape, dtype=bool))
    gx = section.ground_x_m[:, None, :]  # (n, 1, k): broadcasts against the circles
    gy = section.ground_y_m[:, None, :]
    between = (gx > x_exit_m[..., None] + 1e-9) & (gx < x_entry_m[..., None] - 1e-9)
    arc = arc_level(circles, gx)
    under = np.all(~between | (arc <= gy + 1e-9), axis=-1)
    valid = (
        (vx > 1e-6) & (yc >= np.maximum(ye, yn) - 1e-9) & under & np.isfinite(xc) & np.isfinite(yc)
    )
    if section.floor_m is not None:
        # The lowest point of the arc between its ends stays above the floor.
        low_x = np.minimum(np.maximum(xc, x_exit_m), x_entry_m)
        low_y = yc - np.sqrt(np.maximum(r**2 - (low_x - xc) ** 2, 0.0))
        valid &= low_y >= section.floor_m[:, None] - 1e-6
    return Circles(x_exit_m, x_entry_m, ye, yn, xc, yc, r, valid)


_TEMPLATES: dict[tuple, tuple[np.ndarray, np.ndarray, np.ndarray]] = {}


def _slice_template(counts: tuple[int, int, int], dtype) -> tuple[np.ndarray, ...]:
    """Zone of each slice (s,), its midpoint as a fraction of the zone (s,) and the slice
    count of each zone (3,), in ``dtype``; cached per ``counts`` (a handful of densities)."""
    key = (tuple(counts), np.dtype(dtype).str)
    if key not in _TEMPLATES:
        zone = np.repeat(np.arange(3), counts)
        frac = np.concatenate([((np.arange(c) + 0.5) / c).astype(dtype) for c in counts])
        _TEMPLATES[key] = (zone, frac, np.asarray(counts, dtype=dtype))
    return _TEMPLATES[key]


def make_slices(
    section: SlipSection, soils: SlipSoils, circles: Circles, counts: tuple[int, int, int]
) -> Slices:
    """Slice every circle: ``counts`` slices in front of the face, over the reinforced zone and
    behind it, so the zone edges x = 0 and x = L are slice boundaries."""
    xe, xn = circles.x_exit_m, circles.x_entry_m
    length = section.length_m[:, None]
    face = np.minimum(np.maximum(np.zeros_like(xe), xe), xn)
    back = np.minimum(np.maximum(length, xe), xn)
    # The three zones at once: their ends (n, c, 3), then each slice picks its zone.
    zone, frac, count = _slice_template(counts, xe.dtype)
    lo = np.stack([xe, face, back], axis=-1)
    width = np.maximum(np.stack([face, back, xn], axis=-1) - lo, 0.0)
    # np.take keeps the slices contiguous (fancy indexing would not, and sums over a strided
    # last axis round differently from numpy's pairwise sums).
    x = np.take(lo, zone, axis=-1) + frac * np.take(width, zone, axis=-1)
    b = np.take(width / count, zone, axis=-1)
    top = ground_level(section, x)
    base = arc_level(circles, x)
    base = np.where(np.isfinite(base), base, top)
    base = np.minimum(base, top)

    # Soil indices are the columns of the (n, 3) soil arrays: one gather by flat index.
    row = (np.arange(section.n, dtype=np.int64) * 3)[:, None, None]

    def soil(values: FloatArray, which: np.ndarray) -> FloatArray:
        return values.ravel()[which + row]

    gamma = soils.unit_weight_kn_m3[:, None, None, :]
    h = section.height_m[:, None, None]
    in_front = x < 0
    mid_soil = np.where(in_front, FOUNDATION, np.where(x < length[..., None], REINFORCED, RETAINED))
    below = np.maximum(np.minimum(top, 0.0) - base, 0.0)
    middle = np.maximum(np.minimum(top, h) - np.maximum(base, 0.0), 0.0)
    above = np.maximum(top - np.maximum(base, h), 0.0)
    g_top = np.where(in_front, gamma[..., FOUNDATION], gamma[..., RETAINED])
    weight = b * (
        gamma[..., FOUNDATION] * below
        + soil(soils.unit_weight_kn_m3, mid_soil) * middle
        + g_top * above
    )
    weight = weight + b * np.where(in_front, 0.0, section.surcharge_kpa[:, None, None])

    base_soil = np.where((base < 0) | in_front, FOUNDATION, mid_soil)
    c = soil(soils.cohesion_kpa, base_soil)
    tphi = soil(soils.tan_phi, base_soil)
    r = circles.radius_m[..., None]
    sin_a = np.minimum(np.maximum((x - circles.centre_x_m[..., None]) / r, -1.0), 1.0)
    cos_a = np.sqrt(1.0 - sin_a**2)
    # Where the ground is below the water table (a toe slope), the water stands at the ground.
    water = np.minimum(section.water_level_m[:, None, None], top)
    pore = WATER_UNIT_WEIGHT_KN_M3 * np.maximum(water - base, 0.0)
    return Slices(b, x, base, top, weight, sin_a, cos_a, c, tphi, pore)


def reinforcement_moment(section: SlipSection, layers: SlipLayers, circles: Circles) -> FloatArray:
    """Restoring moment of the layers a circle cuts, about its centre, (n, c), kN.m/m.

    A layer is cut where the rising part of the arc crosses it inside the reinforced zone
    (0 < x < L) and inside the sliding mass, by more than :data:`CUT_TOLERANCE_M`. Its force is the least of its design strength,
    the pullout of the part beyond the circle and the hold of the part in front (its pullout,
    plus the facing connection when the layer's face end is inside the mass); the force is horizontal, so its lever arm is the vertical
    distance from the layer to the centre, or along the circle for continuous extensible
    sheets (``layers.tangent``): lever arm R (METHOD section 6).
    """
    y = layers.level_m[:, None, :]
    xc = circles.centre_x_m[..., None]
    yc = circles.centre_y_m[..., None]
    r = circles.radius_m[..., None]
    reach = r**2 - (y - yc) ** 2
    s = np.sqrt(np.maximum(reach, 0.0))
    x_cut = xc + s
    length = section.length_m[:, None, None]
    cut = (
        layers.mask[:, None, :]
        & (reach > 0)
        & (y < yc)
        & (x_cut > CUT_TOLERANCE_M)
        & (x_cut < length)
        & (x_cut > circles.x_exit_m[..., None] + CUT_TOLERANCE_M)
        & (x_cut < circles.x_entry_m[..., None])
    )
    beyond = length - x_cut
    front = x_cut - np.maximum(0.0, xc - s)
    # The facing holds the front end only when the face end of the layer moves with the mass.
    facing = np.where(xc - s <= 0.0, layers.front_kn_m[:, None, :], 0.0)
    p = layers.pullout_kn_m2[:, None, :]
    force = np.minimum(layers.rupture_kn_m[:, None, :], np.minimum(p * beyond, p * front + facing))
    lever = yc - y
    if layers.tangent is not None:
        lever = np.where(layers.tangent[:, None, :], r, lever)
    return np.sum(np.where(cut, np.maximum(force, 0.0) * lever, 0.0), axis=-1)
