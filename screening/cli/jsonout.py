"""The JSON face of a screen (``wallscreen check --json``), as DESIGN.md describes it.

The document is built column by column over all segments (numbers rounded as whole arrays,
see :mod:`screening.cli.json_numbers`); ``segment_json`` is the same entry for one segment,
from its :class:`SegmentResult`. ``check --json`` writes the text straight from the result
(:mod:`screening.cli.json_write`), the same bytes as ``json.dumps(doc, indent=1)``.
"""

from __future__ import annotations

import math
from typing import Any

import numpy as np

from screening import CAUTION
from screening.cli.json_numbers import cdr_column, num_column
from screening.engine.result import CorridorResult, SegmentResult, _unit, cdr_cut
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
    """The whole screen as a JSON-ready dict (built-in types only)."""
    return {**corridor_head(corridor, result), "segments": _segments(result)}


def corridor_head(corridor: Corridor, result: CorridorResult) -> dict[str, Any]:
    """Everything of :func:`corridor_json` before its segments."""
    return {
        "schema": SCHEMA,
        "corridor": corridor.name,
        "factor_set": result.factor_set,
        "engine_version": result.engine_version,
        "counts": result.counts(),
        "caution": CAUTION,
    }


# ------------------------------------------------------------------ all segments at once


def _segments(result: CorridorResult) -> list[dict[str, Any]]:
    """Every segment's entry, equal to ``segment_json(result.segment(i))`` for each ``i``."""
    n = len(result)
    if n == 0:
        return []
    h = np.asarray(result.design_height_m, dtype=np.float64)
    length = np.asarray(result.length_m, dtype=np.float64)
    ratio = np.zeros(n)
    np.divide(length, h, out=ratio, where=h > 0)
    cols = {
        "exposed_height_m": num_column(result.exposed_height_m, 3),
        "design_height_m": num_column(h, 3),
        "embedment_m": num_column(result.embedment_m, 3),
        "length_m": num_column(length, 2),
        "length_ratio": num_column(ratio, 3),
        "rule_length_m": num_column(result.rule_length_m, 2),
        "min_cdr": cdr_column(result.min_cdr),
        "margin_cdr": cdr_column(result.margin_cdr),
        "traffic_kpa": num_column(result.traffic_kpa, 2),
    }
    boost = np.asarray(result.grade_boost).astype(np.int64).tolist()
    checks = _check_columns(result)
    layers = _layer_lists(result)
    extras = _extra_columns(result)
    out = []
    for i in range(n):
        seg: dict[str, Any] = {
            "id": result.ids[i],
            "verdict": result.verdict[i],
            "exposed_height_m": cols["exposed_height_m"][i],
            "design_height_m": cols["design_height_m"][i],
            "embedment_m": cols["embedment_m"][i],
            "length_m": cols["length_m"][i],
            "length_ratio": cols["length_ratio"][i],
            "rule_length_m": cols["rule_length_m"][i],
            "governing": result.governing[i],
            "min_cdr": cols["min_cdr"][i],
            "length_set_by": result.length_set_by[i],
            "margin_check": result.margin_check[i],
            "margin_cdr": cols["margin_cdr"][i],
            "grade_steps_added": boost[i],
            "traffic_kpa": cols["traffic_kpa"][i],
            "reasons": list(result.reasons[i]),
            "checks": {
                name: {
                    "demand": demand[i],
                    "capacity": capacity[i],
                    "cdr": cdr[i],
                    "unit": unit(i),
                    "case": case[i],
                    "where": detail[i],
                }
                for name, (demand, capacity, cdr, unit, case, detail) in checks
            },
            "layers": layers[i],
        }
        if extras:
            seg["extras"] = {key: column[i] for key, column in extras}
        out.append(seg)
    return out


def _check_columns(result: CorridorResult) -> list[tuple[str, tuple]]:
    out = []
    for name, c in result.checks.items():
        detail = list(c.detail)
        if name == "seismic":  # its unit is the governing sub-check's, named in the detail

            def unit(i: int, name: str = name, detail: list[str] = detail) -> str:
                return _unit(name, detail[i])
        else:

            def unit(i: int, fixed: str = _unit(name, "")) -> str:
                return fixed

        cols = (num_column(c.demand), num_column(c.capacity), cdr_column(c.cdr))
        out.append((name, (*cols, unit, list(c.case), detail)))
    return out


def _layer_lists(result: CorridorResult) -> list[list[dict[str, Any]]]:
    lay = result.layers
    mask = np.asarray(lay.mask, dtype=bool)
    depth = num_column(lay.depth_m, 3)
    tension = num_column(lay.tension_kn_m, 2)
    pullout = num_column(lay.pullout_capacity_kn_m, 2)
    rupture = num_column(lay.rupture_capacity_kn_m, 2)
    grade = np.asarray(lay.grade_index).tolist()
    rows = [np.flatnonzero(m).tolist() for m in mask] if mask.size else [[]] * len(result)
    out = []
    for i, js in enumerate(rows):
        names = result.grade_names[i]
        d, t, p, r, g = depth[i], tension[i], pullout[i], rupture[i], grade[i]
        out.append(
            [
                {
                    "depth_m": d[j],
                    "tension_kn_m": t[j],
                    "pullout_capacity_kn_m": p[j],
                    "rupture_capacity_kn_m": r[j],
                    "grade": names[g[j]] if g[j] >= 0 else "none strong enough",
                }
                for j in js
            ]
        )
    return out


def _extra_columns(result: CorridorResult) -> list[tuple[str, list[Any]]]:
    """Per-segment extras as lists of JSON values, in the result's order (what
    ``segment_view`` keeps: arrays or lists as long as the corridor)."""
    n = len(result)
    out = []
    for key, value in result.extras.items():
        if not (isinstance(value, np.ndarray | list) and len(value) == n):
            continue
        if isinstance(value, np.ndarray) and value.dtype.kind == "f":
            out.append((key, num_column(value)))
        elif isinstance(value, np.ndarray) and value.dtype.kind in "biu":
            out.append((key, value.tolist()))
        else:
            out.append((key, [_plain(_scalar(v)) for v in value]))
    return out


def _scalar(value: object) -> object:
    return value.item() if isinstance(value, np.generic) else value
