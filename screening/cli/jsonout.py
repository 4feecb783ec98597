"""The JSON face of a screen (``wallscreen check --json``), as DESIGN.md describes it."""

from __future__ import annotations

import math
from typing import Any

from screening import CAUTION
from screening.engine.result import CorridorResult, SegmentResult, cdr_cut
from screening.model import SCHEMA, Corridor


def _num(x: float, digits: int = 4) -> float | None:
    """A plain float rounded for people; None where the value is not a number."""
    x = float(x)
    if not math.isfinite(x):
        return None
    return round(x, digits)


def _cdr(x: float) -> float | None:
    """A CDR for JSON: cut to 3 decimals, never rounded up past a threshold."""
    x = float(x)
    return cdr_cut(x, 3) if math.isfinite(x) else None


def segment_json(seg: SegmentResult) -> dict[str, Any]:
    """One segment's entry: inputs that matter to a reader, the outcome and every check."""
    checks = {
        name: {
            "demand": _num(c.demand),
            "capacity": _num(c.capacity),
            "cdr": _cdr(c.cdr),
            "unit": c.unit,
            "case": c.case,
            "where": c.detail,
        }
        for name, c in seg.checks.items()
    }
    out: dict[str, Any] = {
        "id": seg.id,
        "verdict": seg.verdict,
        "exposed_height_m": _num(seg.exposed_height_m, 3),
        "design_height_m": _num(seg.design_height_m, 3),
        "embedment_m": _num(seg.embedment_m, 3),
        "length_m": _num(seg.length_m, 2),
        "length_ratio": _num(seg.length_ratio, 3),
        "rule_length_m": _num(seg.rule_length_m, 2),
        "governing": seg.governing,
        "min_cdr": _cdr(seg.min_cdr),
        "length_set_by": seg.length_set_by,
        "margin_check": seg.margin_check,
        "margin_cdr": _cdr(seg.margin_cdr),
        "grade_steps_added": seg.grade_boost,
        "traffic_kpa": _num(seg.traffic_kpa, 2),
        "reasons": list(seg.reasons),
        "checks": checks,
        "layers": [
            {
                "depth_m": _num(layer.depth_m, 3),
                "tension_kn_m": _num(layer.tension_kn_m, 2),
                "pullout_capacity_kn_m": _num(layer.pullout_capacity_kn_m, 2),
                "rupture_capacity_kn_m": _num(layer.rupture_capacity_kn_m, 2),
                "grade": layer.grade,
            }
            for layer in seg.layers
        ],
    }
    extras = {k: _plain(v) for k, v in seg.extras.items()}
    if extras:
        out["extras"] = extras
    return out


def _plain(v: object) -> object:
    """numpy scalars and tuples to JSON-friendly built-ins."""
    if hasattr(v, "tolist"):
        v = v.tolist()  # type: ignore[union-attr]
    if isinstance(v, float):
        return _num(v)
    if isinstance(v, (list, tuple)):
        return [_plain(x) for x in v]
    if isinstance(v, dict):
        return {str(k): _plain(x) for k, x in v.items()}
    return v


def corridor_json(corridor: Corridor, result: CorridorResult) -> dict[str, Any]:
    """The whole screen as a JSON-ready dict."""
    return {
        "schema": SCHEMA,
        "corridor": corridor.name,
        "factor_set": result.factor_set,
        "engine_version": result.engine_version,
        "counts": result.counts(),
        "caution": CAUTION,
        "segments": [segment_json(result.segment(i)) for i in range(len(result))],
    }
