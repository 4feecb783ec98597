"""One segment's frozen view of a :class:`CorridorResult` row (built on demand)."""

from __future__ import annotations

import numpy as np

from screening.engine.result import UNITS, CheckResult, CorridorResult, LayerResult, SegmentResult


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
