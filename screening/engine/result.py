"""Screening results: arrays over all segments, with a per-segment view for people.

The engine fills :class:`CorridorResult` with numpy arrays (shape ``(n,)`` per segment,
``(n, m)`` per layer where ``m`` is the largest layer count, padded and masked). Code that
shows one segment asks for :meth:`CorridorResult.segment`, which builds a small frozen
:class:`SegmentResult` on demand, so a 10,000-segment screen never builds 10,000 objects.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import numpy.typing as npt

FloatArray = npt.NDArray[np.float64]
IntArray = npt.NDArray[np.int64]
BoolArray = npt.NDArray[np.bool_]

CDR_CAP = 99.0
"""CDRs are clipped to [0, CDR_CAP] so every reported ratio is finite."""


def cdr_cut(value: float, digits: int = 3) -> float:
    """A CDR cut (never rounded up) to ``digits`` decimals, for files and JSON."""
    scale = 10**digits
    return float(np.floor(float(value) * scale + 1e-9) / scale)


def cdr_text(value: float, digits: int = 2) -> str:
    """A CDR as text, cut (never rounded up) to ``digits`` decimals: 0.996 reads 0.99, so a
    failing value never shows as 1.00 and a value under a threshold never reaches it."""
    return f"{cdr_cut(value, digits):.{digits}f}"


UNITS = {
    "sliding": "kN/m",
    "eccentricity": "m",
    "bearing": "kPa",
    "pullout": "kN/m",
    "rupture": "kN/m",
    "compound": "kN·m/m",
    "global": "kN·m/m",
    "seismic": "kN/m",
}


@dataclass(frozen=True)
class CheckArrays:
    """One check over all segments, for its governing case (worst layer, worst surface)."""

    demand: FloatArray
    capacity: FloatArray
    cdr: FloatArray
    case: list[str]
    """Name of the governing load case per segment."""
    detail: list[str]
    """Where it governs, in words ("layer 3 at 2.63 m"), per segment; "" when none."""


@dataclass(frozen=True)
class LayerArrays:
    """Per-layer values, shape (n, m); ``mask`` is False on padding."""

    mask: BoolArray
    depth_m: FloatArray
    """Depth of the layer below the top of the reinforced zone, m."""
    tension_kn_m: FloatArray
    """Factored T_max per metre run."""
    pullout_capacity_kn_m: FloatArray
    """Factored pullout resistance per metre run at the chosen L."""
    rupture_capacity_kn_m: FloatArray
    """Factored rupture resistance of the chosen grade per metre run."""
    grade_index: IntArray
    """Index into the reinforcement family's grades (-1 when none passes)."""
    active_length_m: FloatArray
    """La: from the face to the line of maximum tension at this depth, m."""


@dataclass(frozen=True)
class CheckResult:
    """One check of one segment."""

    demand: float
    capacity: float
    cdr: float
    unit: str
    case: str = ""
    detail: str = ""

    @property
    def passes(self) -> bool:
        return self.cdr >= 1.0


@dataclass(frozen=True)
class LayerResult:
    depth_m: float
    tension_kn_m: float
    pullout_capacity_kn_m: float
    rupture_capacity_kn_m: float
    grade: str
    active_length_m: float


@dataclass(frozen=True)
class SegmentResult:
    """Everything screening says about one segment."""

    id: str
    verdict: str
    """clear | marginal | refer."""
    reasons: tuple[str, ...]
    exposed_height_m: float
    design_height_m: float
    embedment_m: float
    length_m: float
    length_ratio: float
    rule_length_m: float
    governing: str
    """Check with the smallest CDR (or the scope reason's key when referred out of scope)."""
    min_cdr: float
    length_set_by: str
    """What set L: a check (the shortest length it passes), "rule of thumb" or "anchorage rule"."""
    margin_check: str
    """The check with the least margin among those that did not set the reinforcement."""
    margin_cdr: float
    """Its CDR (inf when there is none)."""
    grade_boost: int
    """Grade steps above the lightest that passes internally, added for compound stability."""
    checks: dict[str, CheckResult]
    layers: tuple[LayerResult, ...]
    traffic_kpa: float
    extras: dict[str, object] = field(default_factory=dict)
    """Later additions (critical slip circle, seismic values, quantities) by name."""


@dataclass(frozen=True)
class CorridorResult:
    """The screen of a whole corridor, as arrays over segments in corridor order."""

    ids: list[str]
    factor_set: str
    engine_version: str
    verdict: list[str]
    reasons: list[tuple[str, ...]]
    exposed_height_m: FloatArray
    design_height_m: FloatArray
    embedment_m: FloatArray
    length_m: FloatArray
    rule_length_m: FloatArray
    governing: list[str]
    min_cdr: FloatArray
    length_set_by: list[str]
    """What set L per segment (see SegmentResult.length_set_by)."""
    margin_check: list[str]
    margin_cdr: FloatArray
    grade_boost: IntArray
    traffic_kpa: FloatArray
    checks: dict[str, CheckArrays]
    layers: LayerArrays
    grade_names: list[tuple[str, ...]]
    """Grade names of each segment's reinforcement family (for grade_index)."""
    extras: dict[str, object] = field(default_factory=dict)
    """Per-segment arrays added by later checks (e.g. "circle_x_m"), keyed by name."""

    def __len__(self) -> int:
        return len(self.ids)

    @property
    def length_ratio(self) -> FloatArray:
        return self.length_m / self.design_height_m

    def counts(self) -> dict[str, int]:
        """Segments per verdict, all three keys present."""
        out = {"clear": 0, "marginal": 0, "refer": 0}
        for v in self.verdict:
            out[v] += 1
        return out

    def index(self, segment_id: str) -> int:
        return self.ids.index(segment_id)

    def segment(self, i: int) -> SegmentResult:
        """A frozen per-segment view of row ``i``."""
        return segment_view(self, i)


# ------------------------------------------------------------------ one segment's view


def _scalar(value: object) -> object:
    """numpy scalars to built-ins, so views serialise to JSON and TOML as they are."""
    return value.item() if isinstance(value, np.generic) else value


def segment_view(result: CorridorResult, i: int) -> SegmentResult:
    """The frozen :class:`SegmentResult` of row ``i`` (negative ``i`` counts from the end)."""
    n = len(result)
    if not -n <= i < n:
        raise IndexError(f"segment index {i} out of range for {n} segments")
    i %= n
    checks = {
        name: CheckResult(
            demand=float(c.demand[i]),
            capacity=float(c.capacity[i]),
            cdr=float(c.cdr[i]),
            unit=_unit(name, c.detail[i]),
            case=c.case[i],
            detail=c.detail[i],
        )
        for name, c in result.checks.items()
    }
    lay = result.layers
    names = result.grade_names[i]
    layers = tuple(
        LayerResult(
            depth_m=float(lay.depth_m[i, j]),
            tension_kn_m=float(lay.tension_kn_m[i, j]),
            pullout_capacity_kn_m=float(lay.pullout_capacity_kn_m[i, j]),
            rupture_capacity_kn_m=float(lay.rupture_capacity_kn_m[i, j]),
            grade=names[lay.grade_index[i, j]]
            if lay.grade_index[i, j] >= 0
            else "none strong enough",
            active_length_m=float(lay.active_length_m[i, j]),
        )
        for j in np.flatnonzero(lay.mask[i]).tolist()
    )
    extras = {}
    for key, value in result.extras.items():
        if isinstance(value, np.ndarray | list) and len(value) == n:
            extras[key] = _scalar(value[i])
    h = float(result.design_height_m[i])
    length = float(result.length_m[i])
    return SegmentResult(
        id=result.ids[i],
        verdict=result.verdict[i],
        reasons=tuple(result.reasons[i]),
        exposed_height_m=float(result.exposed_height_m[i]),
        design_height_m=h,
        embedment_m=float(result.embedment_m[i]),
        length_m=length,
        length_ratio=length / h if h > 0 else 0.0,
        rule_length_m=float(result.rule_length_m[i]),
        governing=result.governing[i],
        min_cdr=float(result.min_cdr[i]),
        length_set_by=result.length_set_by[i],
        margin_check=result.margin_check[i],
        margin_cdr=float(result.margin_cdr[i]),
        grade_boost=int(result.grade_boost[i]),
        checks=checks,
        layers=layers,
        traffic_kpa=float(result.traffic_kpa[i]),
        extras=extras,
    )


def _unit(name: str, detail: str) -> str:
    """The unit of a check's demand and capacity. The seismic check reports whichever of its
    sub-checks governs, and its detail names that sub-check's unit in brackets."""
    if name == "seismic" and "(" in detail and ")" in detail:
        inner = detail[detail.index("(") + 1 : detail.index(")")]
        if inner in UNITS.values():
            return inner
    return UNITS.get(name, "")
