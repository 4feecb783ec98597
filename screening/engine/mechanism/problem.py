"""A plane-strain limit-analysis model: soils in vertical bands, loads, water, layers.

This is the geometry the mechanism check works on, whatever built it (a wall cross-section in
``section.py`` or a textbook problem in ``reference_problems.py``). Coordinates in metres, x to
the right, y up. The soil body is *vertically simple*: every vertical line meets it in one
interval, from a fixed, rigid base (the firm layer, y = ``base_m``) up to the ground surface.
Both far sides are fixed too; the ground surface is free.

Soils sit in *bands*: a band is one material over ``x0 <= x <= x1`` between a straight bottom
and a straight top (a vertical trapezoid, so convex). In any x-interval between band edges a
material has at most one band (merge bands of one material that would touch vertically).

Loads (per metre run):
- self weight of every band (unit weight, kN/m3);
- uniform vertical pressures on the ground surface between two x (``SurfaceLoad``), either
  ``dead`` or ``live``;
- optionally a rigid strip ``Footing`` on the ground, pushed down by a unit pressure (its
  load factor is the bearing pressure), held against horizontal movement (central vertical
  load), rough (soil strength on its base) or smooth (no shear);
- pore pressure below a level water table, u = 9.81 (h_w - y) kPa, as work on the opening of
  every discontinuity below the table (effective-stress analysis with total unit weights, as
  Bishop's method in the slip check does with its slice bases).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

WATER_UNIT_WEIGHT_KN_M3 = 9.81
DEAD, LIVE = "dead", "live"
WEIGHT, FOOTING = "weight", "footing"
LOAD_KINDS = (WEIGHT, DEAD, LIVE, FOOTING)
"""Names of the load groups a load factor can multiply."""
TOL_M = 1e-7


@dataclass(frozen=True)
class Material:
    """Mohr-Coulomb soil (c', phi') with associated flow; Tresca is friction_deg = 0, c = cu."""

    name: str
    unit_weight_kn_m3: float
    cohesion_kpa: float
    friction_deg: float


@dataclass(frozen=True)
class Band:
    """One material between x0 and x1, bottom and top straight lines (values at x0 and x1)."""

    material: int
    x0_m: float
    x1_m: float
    bottom0_m: float
    bottom1_m: float
    top0_m: float
    top1_m: float


@dataclass(frozen=True)
class SurfaceLoad:
    """Uniform vertical pressure on the ground between x0 and x1 (kPa), dead or live."""

    x0_m: float
    x1_m: float
    pressure_kpa: float
    kind: str = DEAD


@dataclass(frozen=True)
class Footing:
    """Rigid strip footing on the ground from x0 to x1; its load is a unit pressure."""

    x0_m: float
    x1_m: float
    rough: bool = True


@dataclass(frozen=True)
class Layer:
    """A horizontal reinforcement layer at ``level_m`` from x0 (face end) to x1 (tail end).

    ``strength_kn_m`` long-term tensile strength, ``pullout_kn_m2`` pullout resistance per
    metre of anchorage (per metre run), ``connection_kn_m`` hold of the facing on the face end.
    """

    level_m: float
    x0_m: float
    x1_m: float
    strength_kn_m: float
    pullout_kn_m2: float
    connection_kn_m: float


@dataclass(frozen=True)
class Refinement:
    """Where the node grid is fine: a box and its spacing (m); coarser away from it."""

    x0_m: float
    x1_m: float
    y0_m: float
    y1_m: float
    columns_m: tuple[float, ...] = ()
    """x that must be node columns (geometry vertices, load and footing edges)."""
    rows_m: tuple[float, ...] = ()
    """y that must be node rows everywhere (interfaces, crest)."""
    local_rows: tuple[tuple[float, float, float], ...] = ()
    """(x0, x1, y): rows only for the columns in [x0, x1] (toe level in front of a wall)."""
    grading: float = 0.35
    """Growth of the spacing per metre of distance from the box."""
    focus_columns_m: tuple[float, ...] = ()
    focus_rows_m: tuple[float, ...] = ()
    """Columns and rows near which the spacing is ``focus_ratio`` times the box spacing
    (singular points of the mechanism: footing edges, the toe, the crest)."""
    focus_ratio: float = 1.0


@dataclass(frozen=True)
class Problem:
    """Everything the mechanism check needs, in one frozen object (module docstring)."""

    materials: tuple[Material, ...]
    bands: tuple[Band, ...]
    refinement: Refinement
    surface_loads: tuple[SurfaceLoad, ...] = ()
    footing: Footing | None = None
    layers: tuple[Layer, ...] = ()
    water_level_m: float = -np.inf
    label: str = ""
    held_faces: tuple[tuple[float, float, float], ...] = ()
    """(x, y0, y1): a facing holds the vertical ground face at x strictly between y0 and y1:
    no node there, so no discontinuity leaves the soil through that part of the face."""
    breaks_m: np.ndarray = field(init=False, repr=False, compare=False)

    def __post_init__(self) -> None:
        xs = [b.x0_m for b in self.bands] + [b.x1_m for b in self.bands]
        xs += [s.x0_m for s in self.surface_loads] + [s.x1_m for s in self.surface_loads]
        if self.footing is not None:
            xs += [self.footing.x0_m, self.footing.x1_m]
        lo, hi = min(b.x0_m for b in self.bands), max(b.x1_m for b in self.bands)
        xs = np.unique(np.clip(np.array(xs, dtype=np.float64), lo, hi))
        object.__setattr__(self, "breaks_m", xs)

    @property
    def base_m(self) -> float:
        return min(min(b.bottom0_m, b.bottom1_m) for b in self.bands)

    @property
    def x_range_m(self) -> tuple[float, float]:
        return float(self.breaks_m[0]), float(self.breaks_m[-1])

    def band_arrays(self) -> BandArrays:
        return BandArrays.of(self)


@dataclass(frozen=True)
class BandArrays:
    """Bands as arrays (b,), for vectorised geometry."""

    material: np.ndarray
    x0: np.ndarray
    x1: np.ndarray
    bottom0: np.ndarray
    bottom1: np.ndarray
    top0: np.ndarray
    top1: np.ndarray
    unit_weight: np.ndarray

    @classmethod
    def of(cls, p: Problem) -> BandArrays:
        def col(name: str) -> np.ndarray:
            return np.array([getattr(b, name) for b in p.bands], dtype=np.float64)

        mat = np.array([b.material for b in p.bands], dtype=np.int64)
        gamma = np.array([p.materials[m].unit_weight_kn_m3 for m in mat], dtype=np.float64)
        return cls(
            mat,
            col("x0_m"),
            col("x1_m"),
            col("bottom0_m"),
            col("bottom1_m"),
            col("top0_m"),
            col("top1_m"),
            gamma,
        )

    def bottom(self, x: np.ndarray) -> np.ndarray:
        """Bottom of every band at x, shape x.shape + (b,) (extrapolated outside the band)."""
        return _lerp(x, self.x0, self.x1, self.bottom0, self.bottom1)

    def top(self, x: np.ndarray) -> np.ndarray:
        return _lerp(x, self.x0, self.x1, self.top0, self.top1)

    def covers(self, x: np.ndarray) -> np.ndarray:
        """True where x lies strictly inside the band's x-range (x.shape + (b,))."""
        x = np.asarray(x)[..., None]
        return (x > self.x0 + TOL_M) & (x < self.x1 - TOL_M)


def _lerp(x, x0, x1, y0, y1):
    x = np.asarray(x, dtype=np.float64)[..., None]
    w = np.where(x1 > x0, (x - x0) / np.where(x1 > x0, x1 - x0, 1.0), 0.0)
    return y0 + (y1 - y0) * w


def ground_level(p: Problem, x: np.ndarray, side: int = 0) -> np.ndarray:
    """Ground level at x. ``side`` -1/+1 takes the left/right limit at a band edge; 0 the
    higher of the two (the top of a vertical step such as a wall face)."""
    bands = p.band_arrays()
    x = np.asarray(x, dtype=np.float64)
    eps = 1e-6
    if side == 0:
        return np.maximum(ground_level(p, x, -1), ground_level(p, x, 1))
    xs = np.clip(x + side * eps, bands.x0.min(), bands.x1.max())
    inside = (xs[..., None] >= bands.x0) & (xs[..., None] <= bands.x1)
    return np.max(np.where(inside, bands.top(xs), -np.inf), axis=-1)
